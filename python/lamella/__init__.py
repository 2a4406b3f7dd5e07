"""lamella: structural-colour design on numpy arrays.

Thin-film spectra by the characteristic-matrix method, CIE colour, charts,
renders and the design tools (match, tolerance, fit, sweep, multiangle) of the
``lamella`` command line, computed by the same Rust engine: the numbers are
those the command line prints.

Start with ``Scene.load(path)`` or ``Scene.from_dict(d)``, then
``scene.spectrum()`` and ``scene.color()``; inside the stack,
``scene.layer_absorption()``, ``scene.field(...)`` and ``scene.bands()``. Units: wavelengths and thicknesses
in nm, angles in degrees, R/T/A as fractions, XYZ with the perfect reflecting
diffuser at Y = 100. For many designs at once, ``reflectance_batch``.

Computed colour is a prediction: screen colours are approximations limited by
the display; colour sign-off needs a measured sample under the same light and
geometry.
"""

from ._lamella import (
    Bands,
    Chart,
    Colors,
    FieldProfile,
    LayerAbsorption,
    NotComputableError,
    Scene,
    SceneError,
    SceneWarning,
    Spectrum,
    __version__,
    chart,
    fit,
    multiangle,
    reflectance_batch,
    render,
    tolerance,
)
from ._lamella import match  # noqa: F401  (a soft keyword, fine as a name)
from ._sweep import sweep

__all__ = [
    "Bands",
    "Chart",
    "Colors",
    "FieldProfile",
    "LayerAbsorption",
    "NotComputableError",
    "Scene",
    "SceneError",
    "SceneWarning",
    "Spectrum",
    "__version__",
    "chart",
    "fit",
    "match",
    "multiangle",
    "reflectance_batch",
    "render",
    "sweep",
    "tolerance",
]
