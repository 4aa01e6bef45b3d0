"""Reading meshes and case files, writing results."""

from pathlib import Path

from pockmark.errors import FormatError
from pockmark.geometry.units import to_metres
from pockmark.io.obj import _loaders as _obj_loaders

_LOADERS = {**_obj_loaders}


def load_mesh(path, length_unit="m", tags_from="group"):
    """Load a tagged triangle mesh, converting its lengths to metres.

    Parameters
    ----------
    path : str or pathlib.Path
        Mesh file; its suffix selects the reader (``.obj``).
    length_unit : str
        Unit of the file's coordinates (see :data:`pockmark.geometry.LENGTH_UNITS`).
    tags_from : str
        Which statement of the file names each face's shield tag (OBJ: group, object, material).
    """
    path = Path(path)
    scale = to_metres(length_unit)
    loader = _LOADERS.get(path.suffix.lower())
    if loader is None:
        known = ", ".join(sorted(_LOADERS))
        raise FormatError(f"{path}: no reader for {path.suffix or 'files without a suffix'}; use one of: {known}")
    return loader(path, scale=scale, tags_from=tags_from)


__all__ = ["load_mesh"]
