"""Output of a parameter sweep: one row per value of the varied case key (table, CSV, JSON, plot)."""

import math

from pockmark.io.results import write_json, write_table_csv
from pockmark.report.plots import INK, SOURCE_COLORS, _pyplot, _save
from pockmark.report.summary import CAUTIONS

#: Files ``pockmark sweep`` writes into its output folder.
SWEEP_FILES = ("sweep.csv", "sweep.json", "sweep.png")


def sweep_row(value, summary):
    """The figures of one run of the sweep, from its summary."""
    row = {
        "value": value,
        "pnp": summary["pnp"],
        "expected_penetrations": summary["expected_penetrations"],
        "expected_impacts": summary["expected_impacts"],
        "requirement_met": (summary["requirement"] or {}).get("met"),
    }
    for source, entry in summary["by_source"].items():
        row[f"{source}_penetrations"] = entry["expected_penetrations"]
    return row


def write_sweep(key, rows, out_dir, manifest):
    """``sweep.csv``, ``sweep.json`` (rows, manifest, cautions) and ``sweep.png`` (PNP and
    expected penetrations by source against the value), each written atomically."""
    names = list(dict.fromkeys(name for row in rows for name in row))
    columns = {name: [_cell(row.get(name)) for row in rows] for name in names}
    columns = {(key if name == "value" else name): values for name, values in columns.items()}
    write_table_csv(out_dir / "sweep.csv", columns)
    write_json(out_dir / "sweep.json", {"key": key, "rows": rows, "manifest": manifest,
                                        "cautions": list(CAUTIONS)})
    _plot(key, rows, out_dir / "sweep.png")


def _cell(value):
    if value is None:
        return ""
    if isinstance(value, bool):
        return int(value)
    return value


def _numeric(rows):
    return all(isinstance(r["value"], (int, float)) and not isinstance(r["value"], bool)
               for r in rows)


def _plot(key, rows, path):
    plt = _pyplot()
    figure, (top, bottom) = plt.subplots(2, 1, figsize=(7.2, 6.0), sharex=True)
    positions = [r["value"] for r in rows] if _numeric(rows) else list(range(len(rows)))
    top.plot(positions, [r["pnp"] for r in rows], "o-", color=INK)
    top.set_ylabel("PNP (critical components)")
    sources = [name[: -len("_penetrations")] for name in rows[0] if name.endswith("_penetrations")
               and name != "expected_penetrations"]
    for index, source in enumerate(sources):
        bottom.plot(positions, [r[f"{source}_penetrations"] for r in rows], "o-",
                    color=SOURCE_COLORS[index % len(SOURCE_COLORS)], label=source)
    bottom.set_ylabel("expected penetrations")
    bottom.set_xlabel(key)
    if not _numeric(rows):
        bottom.set_xticks(positions, [str(r["value"]) for r in rows])
    if all(r[f"{s}_penetrations"] > 0 for r in rows for s in sources):
        bottom.set_yscale("log")
    bottom.legend(frameon=False)
    for axis in (top, bottom):
        axis.grid(True, alpha=0.3)
        axis.spines[["top", "right"]].set_visible(False)
    top.set_title(f"PNP and penetrations against {key}", color=INK)
    figure.tight_layout()
    return _save(figure, path)


def format_sweep(key, rows):
    """The sweep as terminal text: one line per value."""
    sources = [name[: -len("_penetrations")] for name in rows[0] if name.endswith("_penetrations")
               and name != "expected_penetrations"]
    width = max(len(key), *(len(str(r["value"])) for r in rows)) + 2
    header = f"  {key:<{width}}{'PNP':>10}{'N':>12}" + "".join(f"{s:>14}" for s in sources)
    header += "  requirement"
    lines = [header]
    for row in rows:
        met = {None: "-", True: "met", False: "NOT MET"}[row["requirement_met"]]
        n = row["expected_penetrations"]
        lines.append(f"  {str(row['value']):<{width}}{row['pnp']:>10.5f}{n:>12.4g}"
                     + "".join(f"{row[f'{s}_penetrations']:>14.4g}" for s in sources)
                     + f"  {met}")
    pnps = [r["pnp"] for r in rows]
    if len(rows) > 1 and all(p > 0 for p in pnps):
        spread = max(-math.log(p) for p in pnps) / max(min(-math.log(p) for p in pnps), 1e-300)
        lines.append(f"  expected penetrations vary by a factor {spread:.3g} over the sweep")
    lines.append("  Caution: model estimates, not a certification; each row is one run of the case "
                 "with that value.")
    return "\n".join(lines)
