"""Writing a run directory: every file is written to a temporary name and then renamed."""

import contextlib
import csv
import json
import os
import tempfile
from pathlib import Path

import numpy as np

from pockmark.errors import FormatError

#: Files a run writes into its output directory.
RUN_FILES = (
    "summary.json", "faces.csv", "faces.vtp", "report.html", "by_component.csv", "by_tag.csv", "by_source.csv"
)


def prepare_output_dir(out_dir, inputs, overwrite=False, files=RUN_FILES):
    """Create ``out_dir`` and check that writing ``files`` there harms nothing.

    Raises
    ------
    FormatError
        If a run's file already exists and ``overwrite`` is false, or if an output would
        replace one of ``inputs``.
    """
    out_dir = Path(out_dir)
    if out_dir.exists() and not out_dir.is_dir():
        raise FormatError(f"{out_dir}: exists and is not a directory; choose another --out")
    targets = [(out_dir / name).resolve() for name in files]
    for source in inputs:
        if Path(source).resolve() in targets:
            raise FormatError(
                f"{out_dir}: writing the run there would replace the input {source}; choose another --out"
            )
    if not overwrite:
        existing = [t.name for t in targets if t.exists()]
        if existing:
            raise FormatError(
                f"{out_dir}: already holds {', '.join(existing)}; they won't be overwritten "
                "without --overwrite (or choose another --out)"
            )
    out_dir.mkdir(parents=True, exist_ok=True)
    return out_dir


@contextlib.contextmanager
def atomic_path(path):
    """Yield a temporary path beside ``path``; rename it to ``path`` only on success."""
    path = Path(path)
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=path.suffix, dir=path.parent)
    os.close(handle)
    # mkstemp makes the file private; give the result the permissions a plain write would.
    umask = os.umask(0)
    os.umask(umask)
    os.chmod(temporary, 0o666 & ~umask)
    try:
        yield Path(temporary)
        os.replace(temporary, path)
    finally:
        if os.path.exists(temporary):
            os.unlink(temporary)


def write_json(path, document):
    with atomic_path(path) as temporary:
        temporary.write_text(json.dumps(document, indent=2, default=_json_default) + "\n", encoding="utf-8")


def _json_default(value):
    if isinstance(value, np.generic):
        return value.item()
    if isinstance(value, np.ndarray):
        return value.tolist()
    return str(value)


def write_table_csv(path, columns):
    """Write equal-length columns ``{name: (m,) array}`` as CSV with a header row."""
    names = list(columns)
    with atomic_path(path) as temporary:
        with temporary.open("w", newline="", encoding="utf-8") as handle:
            writer = csv.writer(handle)
            writer.writerow(names)
            data = [columns[name] for name in names]
            for row in zip(*data):
                writer.writerow([f"{v:.9g}" if isinstance(v, (float, np.floating)) else v for v in row])


def write_faces_vtp(path, vertices, faces, cell_arrays, field_data=None):
    """Write a triangle mesh with per-face arrays as VTK XML PolyData (``.vtp``).

    String arrays are written as VTK string arrays; ParaView colours by them as categories.
    """
    import pyvista

    polydata = pyvista.PolyData.from_regular_faces(np.asarray(vertices, dtype=np.float64), np.asarray(faces))
    for name, values in cell_arrays.items():
        polydata.cell_data[name] = np.asarray(values)
    for name, value in (field_data or {}).items():
        polydata.field_data[name] = [value] if isinstance(value, str) else value
    with atomic_path(path) as temporary:
        polydata.save(str(temporary))


def read_run(run_dir, columns):
    """Read an earlier run: its summary and the named numeric columns of its faces.csv.

    Raises
    ------
    FormatError
        If the files are missing, unreadable or lack a column.
    """
    run_dir = Path(run_dir)
    try:
        summary = json.loads((run_dir / "summary.json").read_text(encoding="utf-8"))
        with (run_dir / "faces.csv").open(newline="", encoding="utf-8") as handle:
            reader = csv.reader(handle)
            header = next(reader)
            missing = [name for name in columns if name not in header]
            if missing:
                raise FormatError(f"{run_dir / 'faces.csv'}: no column {missing[0]!r}; was it written by pockmark?")
            positions = [header.index(name) for name in columns]
            rows = [[float(row[p]) for p in positions] for row in reader]
    except (OSError, ValueError, StopIteration, UnicodeDecodeError) as error:
        raise FormatError(f"{run_dir}: cannot read the earlier run ({error}); rerun it or fix the path") from None
    data = np.asarray(rows, dtype=np.float64).reshape(-1, len(columns))
    return summary, {name: data[:, i] for i, name in enumerate(columns)}
