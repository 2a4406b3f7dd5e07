"""Type stubs of the native module. Units: nm, degrees, fractions; XYZ with Y = 100 for the
perfect reflecting diffuser."""

from collections.abc import Mapping, Sequence
from os import PathLike
from typing import Any, Literal

import numpy as np
import numpy.typing as npt

Float1D = npt.NDArray[np.float64]
Float2D = npt.NDArray[np.float64]
Side = Literal["reflect", "transmit"]
Polarization = Literal["unpolarized", "s", "p", "left", "right"]
Handedness = Literal["left", "right"]
Basis = Literal["linear", "circular"]
Complex4D = npt.NDArray[np.complex128]
Gamut = Literal["clip", "chroma"]
ArrayLike1D = npt.ArrayLike
Lab = Sequence[float]

__version__: str

class SceneError(ValueError):
    """Bad input; the message names the file (if any), the key and the value."""

class NotComputableError(SceneError):
    """A result that is not a finite number, naming the quantity and the point."""

class SceneWarning(UserWarning):
    """What a valid scene may still get wrong, naming the key."""

class Spectrum:
    """R, T and A on a grid: arrays (A, W) of fractions; `wavelength_nm` (W,), `angle_deg` (A,).

    The linear basis has R_s, R_p, T_s, T_p; the circular basis R_L, R_R, T_L, T_R
    (totals for left- and right-handed incident light). `r_jones`, `t_jones`: complex
    Jones matrices (A, W, 2, 2) in the basis, order `jones_basis`, or None."""

    wavelength_nm: Float1D
    angle_deg: Float1D
    basis: Basis
    jones_basis: tuple[str, str]
    r_jones: Complex4D | None
    t_jones: Complex4D | None
    R_s: Float2D
    R_p: Float2D
    R_L: Float2D
    R_R: Float2D
    R: Float2D
    T_s: Float2D
    T_p: Float2D
    T_L: Float2D
    T_R: Float2D
    T: Float2D
    A: Float2D
    def to_pandas(self) -> Any:
        """One row per (angle, wavelength) with the columns of `lamella spectrum`'s CSV."""

class Colors:
    """The colour at every angle: arrays (A,), `srgb` (A, 3), `hex` list, `in_gamut` bool array."""

    angle_deg: Float1D
    X: Float1D
    Y: Float1D
    Z: Float1D
    x: Float1D
    y: Float1D
    L: Float1D
    a: Float1D
    b: Float1D
    C: Float1D
    h: Float1D
    srgb: Float2D
    hex: list[str]
    in_gamut: npt.NDArray[np.bool_]
    hue_shift_deg: Float1D
    delta_e00_from_first: Float1D
    delta_e00_per_deg: Float1D
    def to_pandas(self) -> Any:
        """One row per angle with the columns of `lamella color --format csv`."""
    def to_records(self) -> list[dict[str, Any]]:
        """One dict per angle with the keys of `lamella color --format json`."""
    def __len__(self) -> int: ...

class LayerAbsorption:
    """Absorptance per layer as written: `columns` (A_1 … A_K, A_substrate, A_backing), `values` (A, W, C)."""

    columns: list[str]
    values: npt.NDArray[np.float64]
    wavelength_nm: Float1D
    angle_deg: Float1D

class FieldProfile:
    """|E|² against depth: `z_nm` (N,), `layer` (N,) int64, `E2` (N,) relative to the incident wave."""

    z_nm: Float1D
    layer: npt.NDArray[np.int64]
    E2: Float1D
    wavelength_nm: float
    angle_deg: float
    polarization: Literal["s", "p"]

class Bands:
    """cos KΛ = ½ tr M of a repeat group's period: `half_trace_s`, `half_trace_p` (A, W), `stop_bands`."""

    group: str
    wavelength_nm: Float1D
    angle_deg: Float1D
    half_trace_s: Float2D
    half_trace_p: Float2D
    stop_bands: list[dict[str, Any]]

class Scene:
    """A validated scene (immutable; picklable)."""

    @staticmethod
    def load(path: str | PathLike[str]) -> Scene:
        """Reads and validates a scene file as the command line does."""
    @staticmethod
    def from_dict(d: Mapping[str, Any], base_dir: str | PathLike[str] | None = None) -> Scene:
        """Validates a scene document given as a dict; files relative to `base_dir`."""
    def to_dict(self) -> dict[str, Any]:
        """The scene's JSON document."""
    def with_thicknesses(self, thicknesses: Mapping[str, float]) -> Scene:
        """A copy with layer thicknesses (nm) changed, by layer pointer."""
    def spectrum(
        self,
        wavelengths_nm: ArrayLike1D | None = None,
        angles_deg: ArrayLike1D | None = None,
        basis: Basis = "linear",
        jones: bool | None = None,
    ) -> Spectrum:
        """R, T, A in the linear (s, p) or circular (L, R) basis, with Jones matrices
        when `jones` (default: for anisotropic scenes); bit for bit `lamella spectrum`."""
    def layer_absorption(self) -> LayerAbsorption:
        """Absorptance per layer (bit for bit `lamella spectrum --layer-absorption`)."""
    def field(
        self,
        wavelength_nm: float,
        angle_deg: float = 0.0,
        polarization: Literal["s", "p"] = "s",
        points: int = 1000,
    ) -> FieldProfile:
        """|E|² against depth through the stack (as `lamella field`)."""
    def bands(self) -> Bands:
        """Photonic bands and stop bands of the first repeat group (as `lamella bands`)."""
    def color(
        self,
        illuminant: str | None = None,
        observer: str | None = None,
        side: Side = "reflect",
        polarization: Polarization = "unpolarized",
        gamut: Gamut = "clip",
        analyzer: Handedness | None = None,
    ) -> Colors:
        """XYZ, xy, L*a*b*, C*, h, sRGB, hex and gamut at every angle (as `lamella color`)."""
    @property
    def title(self) -> str: ...
    @property
    def path(self) -> str | None: ...
    @property
    def wavelengths_nm(self) -> Float1D: ...
    @property
    def angles_deg(self) -> Float1D: ...
    @property
    def illuminant(self) -> str: ...
    @property
    def observer(self) -> str: ...
    @property
    def has_coating(self) -> bool: ...
    @property
    def variables(self) -> list[dict[str, Any]]:
        """The `vary_nm` layers: pointer, material, thickness_nm, low, high (nm)."""
    @property
    def layers(self) -> list[dict[str, Any]]:
        """Every layer as written: pointer, material, thickness_nm."""
    @property
    def warnings(self) -> list[dict[str, str]]:
        """kind, key and message of each warning."""

class Chart:
    """A chart shown inline by Jupyter (SVG, PNG)."""

    size: tuple[int, int]
    name: str
    def svg(self) -> str: ...
    def png(self) -> bytes: ...
    def to_array(self) -> npt.NDArray[np.uint8]:
        """(H, W, 3) sRGB bytes."""
    def save(self, path: str | PathLike[str]) -> None:
        """Writes .png or .svg (by the extension) atomically."""
    def _repr_svg_(self) -> str: ...
    def _repr_png_(self) -> bytes: ...

def reflectance_batch(
    media: npt.ArrayLike,
    thicknesses_nm: npt.ArrayLike,
    wavelengths_nm: ArrayLike1D,
    angles_deg: ArrayLike1D | None = None,
) -> dict[str, npt.NDArray[np.float64]]:
    """R_s, R_p, R, T_s, T_p, T of shape (D, A, W) for D designs; media (W, L+2) or (D, W, L+2)."""

def match(
    scene: Scene,
    target_lab: Lab | None = None,
    target_hex: str | None = None,
    angle: float | None = None,
    geometry: str | None = None,
    goals: Sequence[tuple[float | str, Lab]] | None = None,
    max_total_nm: float | None = None,
    brightness_weight: float = 0.0,
    seed: int = 1,
    max_evals: int = 60000,
    illuminant: str | None = None,
    observer: str | None = None,
    side: Side = "reflect",
    polarization: Polarization = "unpolarized",
    gamut: Gamut = "clip",
    analyzer: Handedness | None = None,
) -> dict[str, Any]:
    """`lamella match`: the report as a dict, with `scene` the matched Scene."""

def tolerance(
    scene: Scene,
    sigma_nm: float | None = None,
    sigma_pct: float | None = None,
    sigma_n: float = 0.0,
    per_period: bool = False,
    yield_angles: ArrayLike1D | None = None,
    yield_geometries: Sequence[str] | None = None,
    samples: int = 1000,
    limit: float = 1.0,
    seed: int = 1,
    illuminant: str | None = None,
    observer: str | None = None,
    side: Side = "reflect",
    polarization: Polarization = "unpolarized",
    gamut: Gamut = "clip",
    analyzer: Handedness | None = None,
) -> dict[str, Any]:
    """`lamella tolerance`: ΔE00 statistics, yield and sensitivity as a dict."""

def fit(
    scene: Scene,
    measured: str | PathLike[str] | Mapping[str, Any] | tuple[Any, ...],
    angle: float = 0.0,
    scale: bool = False,
    seed: int = 1,
    max_evals: int = 20000,
    chart: str | PathLike[str] | None = None,
) -> dict[str, Any]:
    """`lamella fit`: the report as a dict, with `scene` the fitted Scene and
    `chart` the measured-against-fitted Chart (also written to `chart`)."""

def multiangle(
    scene: Scene,
    geometries: str | Sequence[str] | None = None,
    spectra: bool = False,
    illuminant: str | None = None,
    observer: str | None = None,
    gamut: Gamut = "clip",
) -> dict[str, Any]:
    """`lamella multiangle`: colour per geometry (arrays), flop index, hue travel, gloss."""

def render(
    scene: Scene,
    shape: str | None = None,
    size: tuple[int, int] | str | None = None,
    ssaa: int | None = None,
    exposure: float | None = None,
    tone: bool | str | None = None,
    roughness_deg: float | None = None,
    base: str | None = None,
    lights: Sequence[str] | None = None,
    orbit_deg: float | None = None,
    elevation_deg: float | None = None,
    fov_deg: float | None = None,
    distance: float | None = None,
    turntable: int | None = None,
    environment: str | npt.NDArray[np.float32] | None = None,
    environment_white: str | None = None,
    view: str | None = None,
    floor: float | str | bool | None = None,
    shadow: bool | str | None = None,
    analyzer: Handedness | None = None,
    caption: bool | str | None = None,
    orbit_elevation_deg: tuple[float, float] | None = None,
) -> npt.NDArray[np.uint8]:
    """`lamella render`: sRGB (H, W, 3), or (N, H, W, 3) with a turntable."""

def chart(
    scene: Scene,
    kind: str = "angle-strip",
    size: tuple[int, int] = (1200, 800),
    compare: Sequence[Scene] | None = None,
    illuminant: str | None = None,
    observer: str | None = None,
    side: Side = "reflect",
    polarization: Polarization = "unpolarized",
    gamut: Gamut = "clip",
    ticks: Sequence[float] | None = None,
    angles: Sequence[float] = (0.0, 30.0, 60.0),
    curves: Sequence[Polarization] = ("unpolarized", "s", "p"),
    transmittance: bool = False,
    layer: int | None = None,
    thickness_range: tuple[float, float] | None = None,
    scale_range: tuple[float, float] | None = None,
    steps: int | None = None,
    wavelength: float | None = None,
    angle: float = 0.0,
    with_reflectance: bool = False,
    analyzer: Handedness | None = None,
) -> Chart:
    """`lamella chart`: a Chart object."""

def _sweep(scene: Scene, **options: Any) -> dict[str, Any]: ...
def _sweep_size(scene: Scene, samples: int | None = None, grid: int | None = None) -> int: ...
def _shard_range(total: int, index: int, count: int) -> tuple[int, int]: ...
def _scene_from_state(text: str, label: str, base: str, files: dict[str, str]) -> Scene: ...
