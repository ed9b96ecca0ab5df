"""spaceframe: is a pin-jointed frame, as it will stand, held in every direction?

The core audit needs only NumPy, SciPy and pymetis::

    import spaceframe
    frame = spaceframe.load("models/plant_platform.toml")
    result = spaceframe.audit(frame)
    result.mechanisms, result.self_stress_states, result.stable
"""

from .errors import ModelError, SpaceframeError, SpaceframeWarning
from .model import Frame
from .tolerances import DEFAULT as DEFAULT_TOLERANCES, Tolerances

__version__ = "0.1.0"

__all__ = ["load", "audit", "forces", "restraints", "Frame", "Tolerances", "DEFAULT_TOLERANCES", "SpaceframeError",
           "ModelError", "SpaceframeWarning", "__version__"]


def load(path, **kw):
    """Read a model file into a :class:`Frame` (see :func:`spaceframe.io.load`)."""
    from .io import load as _load
    return _load(path, **kw)


def audit(frame, **kw):
    """Audit a frame's stability (see :func:`spaceframe.analysis.audit.audit`)."""
    from .analysis.audit import audit as _audit
    return _audit(frame, **kw)


def forces(frame, cases=None, **kw):
    """Member forces and reactions under the frame's load cases (see
    :func:`spaceframe.analysis.forces.forces`)."""
    from .analysis.forces import forces as _forces
    return _forces(frame, cases, **kw)


def restraints(frame, **kw):
    """Chords, restraint points, unrestrained lengths and restraint forces (see
    :func:`spaceframe.analysis.restraints.restraints`)."""
    from .analysis.restraints import restraints as _restraints
    return _restraints(frame, **kw)
