"""The one way spaceframe imports an optional library.

The core audit needs numpy, scipy, pymetis, click, rtoml and threadpoolctl only.  Pictures,
imports of meshes and drawings, and batches on Dask need more; those libraries
come with the package's extras (``pyproject.toml``)::

    pip install 'spaceframe[pictures]'   # pyvista, imageio, Pillow, matplotlib, rich
    pip install 'spaceframe[video]'      # imageio-ffmpeg, for MP4
    pip install 'spaceframe[imports]'    # trimesh, svg.path, lxml, networkx
    pip install 'spaceframe[batch]'      # dask.distributed, rich
    pip install 'spaceframe[ifc]'        # ifcopenshell, for IFC models in and out
    pip install 'spaceframe[pardiso]'    # MKL PARDISO: the sparse engine's fast factorisation
    pip install 'spaceframe[all]'

Every optional import goes through :func:`require`, inside the function that
needs it, so the package imports and the audit runs without any extra, and a
missing one is reported on first use with the extra to install.
"""

from __future__ import annotations

import importlib
from types import ModuleType

from .errors import MissingExtraError

__all__ = ["require", "EXTRAS"]

#: The extra that installs each optional top-level module, and what needs it.
EXTRAS: dict[str, tuple[str, str]] = {
    "pyvista": ("pictures", "Pictures, animations and the view window"),
    "imageio": ("pictures", "Pictures and animations"),
    "PIL": ("pictures", "Captions and legends of pictures"),
    "matplotlib": ("pictures", "The colours of a state of self-stress"),
    "rich": ("pictures", "Progress bars"),
    "imageio_ffmpeg": ("video", "MP4 animations"),
    "trimesh": ("imports", "Mesh, line and drawing imports (STL, OBJ, PLY, OFF, glTF, DXF, "
                           "SVG)"),
    "svg": ("imports", "SVG drawing imports"),
    "lxml": ("imports", "SVG drawing imports"),
    "ifcopenshell": ("ifc", "Reading and writing IFC models"),
    "pypardiso": ("pardiso", "The sparse engine's fast factorisation (SuperLU is used without "
                             "it)"),
    "dask": ("batch", "Batches on Dask"),
    "distributed": ("batch", "Batches on Dask"),
}


def require(name: str) -> ModuleType:
    """Import the optional module ``name`` (dotted names allowed) and return it.

    Parameters
    ----------
    name : str
        A module whose top-level package is a key of :data:`EXTRAS`, e.g.
        ``"pyvista"``, ``"PIL.ImageDraw"`` or ``"dask.distributed"``.

    Returns
    -------
    module

    Raises
    ------
    MissingExtraError
        When the module (or a library it needs) cannot be imported; the
        message names the extra that installs it.

    Examples
    --------
    >>> require("imageio.v3").__name__
    'imageio.v3'
    """
    top = name.split(".")[0]
    extra, purpose = EXTRAS[top]
    try:
        return importlib.import_module(name)
    except ImportError as exc:
        raise MissingExtraError(exc.name or top, extra, purpose) from None
