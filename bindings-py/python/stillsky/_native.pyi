"""Type stubs and user documentation for the extension module ``stillsky._native``.

Conventions: SI units (m, kg, s, N, rad); frequencies in Hz; harmonic convention e^{+iωt};
complex stiffness k* = k'(1 + iη); dynamic stiffness Z(ω) = K*(ω) + iωC − ω²M.

Array arguments are float64 and 1-D. NumPy float64 arrays are read in place (one copy when not
C-contiguous); lists and tuples are converted once; a NumPy array of another dtype raises
``TypeError``. Results are new arrays owned by NumPy (no copy on the way out). Heavy calls
release the GIL: do not modify an input array from another thread during a call.
"""

from os import PathLike
from typing import Any, Iterable, Literal, Mapping, Sequence, final, overload

import numpy as np
import numpy.typing as npt

__version__: str
def _model_from_toml(text: str, label: str) -> Model:
    """Restore a pickled Model (used by Model.__reduce__)."""

_F64In = npt.ArrayLike
_F64 = npt.NDArray[np.float64]
_C128 = npt.NDArray[np.complex128]

class StillskyError(Exception):
    """Base class of every error raised by stillsky."""

class InvalidInputError(StillskyError, ValueError):
    """An input value, grid, shape, name or file text is wrong; the message names the field,
    file and line, or value."""

class UnsupportedModelError(InvalidInputError):
    """The structure cannot be analysed, e.g. a body with a free rigid-body mode (named)."""

class SingularSystemError(InvalidInputError):
    """The dynamic stiffness matrix is singular at the frequency named in the message."""

class NotPositiveDefiniteError(InvalidInputError):
    """A matrix that must be symmetric positive definite (e.g. the mass matrix) is not."""

class ConvergenceError(StillskyError, RuntimeError):
    """An iterative method did not converge."""

class StillskyIOError(StillskyError, OSError):
    """Reading or writing a file failed; the message names the path."""

@final
class Modes:
    """Natural modes of a :class:`Model`, ascending in frequency.

    Shapes are undamped and mass-normalised (Φᵀ M Φ = I). Where stiffness depends on frequency,
    each mode's stiffness is evaluated at that mode's own frequency. The attributes return the
    same array objects on every access.
    """

    @property
    def frequency_hz(self) -> _F64:
        """Natural frequencies (Hz), shape (n_modes,)."""
    @property
    def damping_ratio(self) -> _F64:
        """Modal damping ratio ζ (dimensionless), shape (n_modes,): half the modal loss factor
        plus the viscous modal damping (modal strain energy estimate)."""
    @property
    def shapes(self) -> _F64:
        """Mass-normalised mode shapes, shape (dof_count, n_modes); row order is
        ``Model.dof_labels``; units m or rad per sqrt(kg)."""
    @property
    def participation(self) -> _F64:
        """Participation factor Γ for ground motion along x, y, z (kg^½), shape (n_modes, 3)."""
    @property
    def effective_mass_kg(self) -> _F64:
        """Effective modal mass Γ² (kg) for ground x, y, z, shape (n_modes, 3)."""
    @property
    def dominant_dofs(self) -> list[str]:
        """For each mode, the DOF label with the largest kinetic-energy share."""
    @property
    def labels(self) -> list[str]:
        """Each mode named in the mount's axes, e.g. ``"payload: altitude nod"``."""
    @property
    def energy(self) -> list[dict[str, object]]:
        """Per mode: ``{"bodies": [(owner, kinetic share)], "connectors": [(name, strain
        share)]}``, largest first; each list sums to 1 ("which part rings")."""
    def __len__(self) -> int: ...

@final
class Model:
    """An assembled linear structure: mass, damping and complex stiffness over its free DOFs,
    with named inputs and outputs. Immutable; safe to share between threads.

    Inputs: ``ground_x``, ``ground_y``, ``ground_z`` (unit ground displacement, m, of every
    ground attachment), ``wind`` (unit force, N, at the wind's centre of pressure),
    ``force:NAME:x|y|z`` (N) and ``moment:NAME:x|y|z`` (N·m).

    Outputs: ``NAME:x|y|z|rx|ry|rz`` (absolute displacement, m, or rotation, rad) and, with
    optics, ``image_x``, ``image_y`` (line-of-sight motion on the sky, rad).
    """

    @staticmethod
    def from_toml(
        path: str | PathLike[str],
        *,
        altitude_deg: float | None = None,
        azimuth_deg: float | None = None,
        hour_angle_deg: float | None = None,
        declination_deg: float | None = None,
        pier_side: Literal["east", "west"] | None = None,
        wind_from_deg: float | None = None,
    ) -> Model:
        """Read a TOML model file.

        Args:
            path: file path.
            altitude_deg, azimuth_deg: a pointing that replaces the file's ``[optics]`` one; the
                payload of a rig is posed for it exactly as if the file had been edited.
            hour_angle_deg, declination_deg, pier_side: the same for an equatorial pointing
                (hour angle positive west; the side of the pier the tube is on).
            wind_from_deg: the azimuth the wind blows from (deg from north through east); a rig's
                wind parts are derived for it, as ``[wind_load] from_azimuth_deg`` in the file.

        Raises:
            StillskyIOError: the file cannot be read (also an ``OSError``).
            InvalidInputError: malformed file, unknown key (message names file and line),
                bad values (message names the field).
            UnsupportedModelError: e.g. a body free to move (named).
        """
    @staticmethod
    def from_toml_str(
        text: str,
        label: str = ...,
        *,
        altitude_deg: float | None = None,
        azimuth_deg: float | None = None,
        hour_angle_deg: float | None = None,
        declination_deg: float | None = None,
        pier_side: Literal["east", "west"] | None = None,
        wind_from_deg: float | None = None,
    ) -> Model:
        """Build a model from TOML text.

        Args:
            text: the model file contents.
            label: name of the source used in error messages (e.g. a file name).
            altitude_deg, azimuth_deg: a pointing that replaces the file's ``[optics]`` one (see
                ``from_toml``).
        """
    def wind_parts(self) -> list[dict[str, Any]]:
        """The wind's parts (derived from a rig's parts, or the model's ``[wind]``): dicts with
        ``name``, ``body``, ``centre_of_pressure_m``, ``direction`` (unit force direction),
        ``area_m2`` and ``drag_coefficient``; empty when the model takes no wind."""
    def wind_resultant(
        self,
        speed_m_s: float,
        *,
        air_density_kg_m3: float = 1.225,
        about_m: Sequence[float] = ...,
    ) -> tuple[list[float], list[float]]:
        """Mean-wind force (N) and moment about ``about_m`` (N·m) summed over the parts at
        ``speed_m_s``: Σ ½ρU²C_dA ê and Σ (r − about) × ½ρU²C_dA ê.

        Raises:
            InvalidInputError: the model takes no wind, or a bad speed or density.
        """
    @property
    def dof_count(self) -> int:
        """Number of free degrees of freedom n."""
    @property
    def dof_labels(self) -> list[str]:
        """Label of each free DOF in matrix order, e.g. ``"payload:z"``."""
    @property
    def input_names(self) -> list[str]:
        """All input names this model accepts."""
    @property
    def output_names(self) -> list[str]:
        """All output names this model offers."""
    def modes(self) -> Modes:
        """Natural frequencies, damping ratios, shapes and participation (GIL released)."""
    @overload
    def frf(self, freq_hz: _F64In, input: str, output: str) -> _C128:
        """Frequency response of one output to one input.

        Args:
            freq_hz: frequencies (Hz), 1-D float64, strictly increasing, finite, > 0.
            input: input name (ground displacement in m, force in N, moment in N·m).
            output: output name (displacement in m or rotation in rad).

        Returns:
            complex128 array, shape (n_freq,): output per unit input (so ``ground_z`` →
            ``body:z`` is the dimensionless transmissibility).
        """
    @overload
    def frf(
        self, freq_hz: _F64In, input: str | Sequence[str], output: str | Sequence[str]
    ) -> _C128:
        """Frequency response of several outputs to several inputs.

        With a list for ``input`` or ``output`` (a single str counts as a list of one) the
        result has shape (n_freq, n_out, n_in), complex128. Runs with the GIL released.
        """
    def matrices(self, freq_hz: float) -> dict[Literal["mass", "damping", "stiffness"], npt.NDArray[np.float64] | _C128]:
        """The system matrices over the free DOFs, each (n, n).

        Args:
            freq_hz: frequency (Hz, ≥ 0) at which the complex stiffness is evaluated.

        Returns:
            ``{"mass": M (kg, kg·m²; float64), "damping": C (viscous, N·s/m etc.; float64),
            "stiffness": K*(f) (N/m, N·m/rad; complex128, without the viscous part)}``, so that
            Z(ω) = K* + iωC − ω²M.
        """
    def input_vector(self, name: str, freq_hz: float = 0.0) -> _C128:
        """Right-hand side b of Z(ω) x = b for one input at ``freq_hz`` (Hz, ≥ 0).

        For ground inputs b = −Z_fg(ω) e_d (forces, N, per metre of ground motion); for forces
        and moments the fixed generalised load. Shape (n,), complex128.
        """
    def output_vector(self, name: str) -> _F64:
        """Row r of an output over the free DOFs (output = r · x), shape (n,), float64."""
    def image_motion(
        self,
        freq_hz: _F64In,
        *,
        ground: Psd | Mapping[str, Psd | None] | Sequence[Psd | None] | None = None,
        wind: Wind | None = None,
        loads: Mapping[str, Psd] | Sequence[tuple[str, Psd]] | None = None,
        exposure_s: float | None = None,
        guide: float | tuple[float, float] | Mapping[str, float] | None = None,
        radius_px: float | None = None,
        seeing_fwhm_arcsec: float | None = None,
        mode_shares: bool = True,
    ) -> ImageMotion:
        """Image motion on the sky and sensor under uncorrelated disturbances (needs [optics]).

        Args:
            freq_hz: evaluation grid (Hz), 1-D float64, strictly increasing, > 0.
            ground: ground-motion PSD (displacement, velocity or acceleration) per axis, as
                ``{"x": psd, "y": psd, "z": psd}`` (missing axes = no motion), one ``Psd`` for
                all three axes, or a sequence of three ``Psd | None``. Spectra are resampled
                log–log onto ``freq_hz`` and taken as zero outside their own range (reported in
                ``summary()["notes"]``).
            wind: mean wind and turbulence (``Wind``) acting at the model's ``[wind]`` load
                point through the linearised drag S_F = (ρ C_d A U)² S_u.
            loads: {input name: force PSD N²/Hz or moment PSD (N·m)²/Hz}, e.g.
                ``{"force:payload:x": psd}`` (or a sequence of such pairs); uncorrelated.
            exposure_s: split the motion into centroid wander and smear for exposures of this
                length (s); also sets the duration of ``peak``.
            guide: the sampled-data guide loop applied to the motion: a cadence (s, integral
                gain 0.5), ``(cadence_s, gain)``, or a mapping with ``cadence_s``, ``gain`` and
                optionally ``exposure_s`` (guide exposure, ≤ cadence; default the cadence),
                ``latency_s`` (default 0) and ``proportional_gain`` (default 0). Residual PSDs
                include the motion the sampler folds in; an unstable loop raises
                ``InvalidInputError`` naming ``guide.gain``.
            radius_px: radius (pixels) for ``p_outside()`` (default ½ pixel).
            seeing_fwhm_arcsec: seeing FWHM (arcsec); default from the model's optics.
            mode_shares: compute each mode's share of the mean square.

        Returns:
            ``ImageMotion`` (RMS in arcsec, µm and px, PSDs, cumulative RMS, shares,
            ``p_outside()``, ``summary()``). GIL released.
        """

    def sky_map(
        self,
        freq_hz: _F64In,
        *,
        ground: Psd | Mapping[str, Psd | None] | Sequence[Psd | None] | None = None,
        wind: Wind | None = None,
        loads: Mapping[str, Psd] | Sequence[tuple[str, Psd]] | None = None,
        wind_from_deg: float | None = None,
        altitudes_deg: _F64In | None = None,
        azimuths_deg: _F64In | None = None,
        hour_angles_deg: _F64In | None = None,
        declinations_deg: _F64In | None = None,
        min_altitude_deg: float | None = None,
        exposure_s: float | None = None,
        seeing_fwhm_arcsec: float | None = None,
    ) -> dict[str, object]:
        """Image RMS over the sky: the model file re-pointed at each cell (equatorial cells on
        the usual pier side), rebuilt and evaluated like ``image_motion``. Needs a ``Model``
        built from model-file text (``from_toml``/``from_toml_str``).

        Args:
            freq_hz, ground, wind, loads, exposure_s, seeing_fwhm_arcsec: as in ``image_motion``.
            wind_from_deg: azimuth the wind blows from (deg from north through east); replaces
                the direction of the model's ``[wind]`` load.
            altitudes_deg, azimuths_deg: the grid of an alt-azimuth rig (default altitude
                20…90° by 10°, azimuth 0…330° by 30°).
            hour_angles_deg, declinations_deg: the grid of an equatorial rig (default hour angle
                −90…90° (−6…+6 h) by 15°, declination by 10° over the band reaching 20°
                altitude on the meridian). Axes of the other frame raise ``InvalidInputError``.
            min_altitude_deg: cells whose line of sight is lower (deg, default 20) are not
                computed: NaN, never best or worst.

        Returns:
            dict with ``frame`` ("alt_az" or "equatorial"), ``axes`` (the names of the row and
            column coordinates), the two axis vectors under those names (``altitude_deg`` and
            ``azimuth_deg``, or ``hour_angle_deg`` and ``declination_deg``), 2-D float64 arrays
            ``rms_arcsec``, ``rms_px`` and ``cell_altitude_deg`` (rows × columns),
            ``latitude_deg``, ``min_altitude_deg``, ``best`` and ``worst`` (dicts with ``row``,
            ``col``, ``row_deg``, ``col_deg``, ``altitude_deg``, ``rms_arcsec``, ``rms_px``,
            ``place``; None if no cell was computed), ``summary`` (text), ``pier_side`` (text
            for an equatorial map: the tube changes sides at the meridian; None for alt-az) and
            ``csv`` (text).
            GIL released.
        """

    def response(
        self,
        freq_hz: _F64In,
        *,
        ground: Psd | Mapping[str, Psd | None] | Sequence[Psd | None] | None = None,
        wind: Wind | None = None,
        loads: Mapping[str, Psd] | Sequence[tuple[str, Psd]] | None = None,
        output: str | Sequence[str],
    ) -> Psd | dict[str, Psd]:
        """Response PSD of an output under uncorrelated disturbances: S_y = Σ_i |H_yi|² S_i.

        Args:
            freq_hz: evaluation grid (Hz), 1-D float64, strictly increasing, > 0.
            ground, wind, loads: as in ``image_motion`` (ground motion PSD per axis x/y/z in
                any motion quantity; ``Wind`` at the ``[wind]`` load point; {input name: force
                PSD N²/Hz or moment PSD (N·m)²/Hz}).
            output: an output name (``"BODY:x|y|z|rx|ry|rz"``, ``"image_x"``, ``"image_y"``), or
                a sequence of names.

        Returns:
            a ``Psd`` on ``freq_hz`` (displacement m²/Hz, or angle rad²/Hz for rotations and
            image axes), or {name: Psd} for a sequence of names. GIL released.
        """
    def transient(
        self,
        input: str,
        history: _F64In,
        fs: float,
        *,
        outputs: str | Sequence[str] | None = None,
        ground: Literal["displacement", "acceleration"] = "displacement",
        decay_tolerance: float = 1e-6,
        radius_px: float = 0.5,
    ) -> Transient:
        """Response to a time history of one input, from rest, by FFT convolution.

        Args:
            input: input name (``"force:BODY:x"`` N, ``"moment:BODY:y"`` N·m, ``"wind"`` N,
                ``"ground_z"`` m, or m/s² with ``ground="acceleration"``).
            history: input samples from t = 0 (unit of the input), 1-D float64. A jump on a
                sample should carry the mid value (see the core's transient docs).
            fs: sample rate (Hz).
            outputs: output names (default ``("image_x", "image_y")``); results in m or rad.
            ground: meaning of a ground-input history.
            decay_tolerance: the zero padding lasts until the slowest mode's envelope has
                fallen by this factor (wrap-around below about this fraction).
            radius_px: radius (pixels) for the settle time and fraction outside (image outputs).

        Returns:
            ``Transient`` (``time_s``, ``values`` (n_out, n), and image metrics when both image
            axes are among the outputs and the model has optics). GIL released. Constant
            hysteretic damping is not causal (a small precursor); prefer Kelvin–Voigt, Zener
            or fractional models for time histories.
        """
    def newmark(
        self,
        input: str,
        history: _F64In,
        fs: float,
        *,
        outputs: str | Sequence[str],
        ground: Literal["displacement", "acceleration"] = "displacement",
    ) -> Transient:
        """Average-acceleration Newmark integration (γ = ½, β = ¼) of a history of ``input``
        (unit as in ``transient``) at time step 1/``fs`` (Hz), from rest: an independent check
        of ``transient`` for viscously damped, frequency-independent models (others raise
        ``UnsupportedModelError``). The load is linear between samples. Outputs in m or rad;
        ``fft_len`` is 0. GIL released."""
    def image_response(
        self,
        input: str,
        history: _F64In,
        fs: float,
        *,
        ground: Literal["displacement", "acceleration"] = "displacement",
        decay_tolerance: float = 1e-6,
        radius_px: float = 0.5,
    ) -> ImageTransient:
        """Sensor-plane response (arcsec) to a history of ``input`` (unit as in ``transient``),
        sampled at ``fs`` (Hz); needs ``[optics]``. Metrics use ``radius_px`` (pixels).
        GIL released."""
    def gust_family(self, wind: Wind) -> dict[str, object]:
        """The wind case's family of 1-cosine gusts (half the first period to 4 s): ``cases``
        (each ``duration_s``, ``amplitude_m_s``, ``peak_px``, ``peak_after_start_s``,
        ``ringdown_s`` from the gust's end until within 1/2 px, or None), ``worst_peak`` and
        ``worst_ringdown`` (indices into ``cases``), ``fs_hz``, ``record_s``. GIL released."""
    def gust_response(
        self,
        gust: Gust,
        *,
        mean_speed_m_s: float,
        fs: float,
        duration_s: float,
        air_density_kg_m3: float = 1.225,
        drag_law: Literal["quadratic", "linearised"] = "quadratic",
        decay_tolerance: float = 1e-6,
        radius_px: float = 0.5,
    ) -> ImageTransient:
        """Image response to a gust on the model's ``wind`` input (needs ``[wind]`` and ``[optics]``).

        Args:
            gust: the wind-speed fluctuation u′(t) (``Gust``).
            mean_speed_m_s: mean wind speed U (m/s).
            fs: sample rate (Hz); duration_s: length of the history (s), n = round(duration·fs).
            air_density_kg_m3: ρ (kg/m³).
            drag_law: ``"quadratic"`` F′ = ½ρC_dA[(U+u′)|U+u′| − U²] or ``"linearised"``
                F′ = ρC_dA U u′; area and C_d from ``[wind]``.
            decay_tolerance, radius_px: as in ``transient``.

        Returns:
            ``ImageTransient``; ``input_history`` is the drag fluctuation (N). The mean drag's
            static deflection is not included. GIL released.
        """
    def __reduce__(self) -> tuple[object, tuple[str, str]]:
        """Pickle as the model-file text it was built from (bit-identical results after loading)."""

@final
class Wind:
    """Mean wind and its turbulence at a height (a ``wind=`` disturbance)."""

    def __new__(
        cls,
        kind: Literal["kaimal", "kaimal-iec", "von-karman", "davenport"] | str,
        mean_speed_m_s: float,
        height_m: float,
        *,
        turbulence_intensity: float | None = None,
        roughness_length_m: float | None = None,
        shelter_factor: float = 1.0,
        air_density_kg_m3: float | None = None,
        admittance: bool = True,
    ) -> Wind:
        """Args:
        kind: along-wind spectrum shape (see ``wind_spectrum``).
        mean_speed_m_s: mean speed U at ``height_m`` (m/s), > 0.
        height_m: height above ground (m), > 0.
        turbulence_intensity: σ_u / U; give this or ``roughness_length_m`` (m), not both; with
            neither, 0.2 (as on the command line).
        shelter_factor: factor in (0, 1] on the mean speed for a sheltered site.
        air_density_kg_m3: ρ (kg/m³), default 1.225 (ISA sea level).
        admittance: reduce the drag at the model's ``[wind]`` load by the aerodynamic admittance
            of a compact body, |χ|² = 1/[1 + (2 f √A / U)^{4/3}]² (Vickery's form); ``False``
            gives the quasi-steady drag.
        """
    @property
    def admittance(self) -> bool: ...
    @property
    def mean_speed_m_s(self) -> float: ...
    @property
    def height_m(self) -> float: ...
    def spectrum(self, freq_hz: _F64In) -> Psd:
        """Along-wind velocity PSD ((m/s)²/Hz) on ``freq_hz``."""

@final
class ImageMotion:
    """Image motion on the sky (arcsec) and sensor (µm, px): the result of ``Model.image_motion``."""

    @property
    def rms_arcsec(self) -> float:
        """Radial RMS √(σx² + σy²) on the sky (arcsec)."""
    @property
    def rms_um(self) -> float:
        """Radial RMS in the sensor plane (µm)."""
    @property
    def rms_px(self) -> float:
        """Radial RMS in pixels."""
    @property
    def plate_scale_arcsec_per_px(self) -> float: ...
    @property
    def per_axis_arcsec(self) -> _F64:
        """RMS of image_x (azimuth) and image_y (altitude), arcsec, shape (2,)."""
    @property
    def freq_hz(self) -> _F64: ...
    @property
    def psd(self) -> _F64:
        """PSD of image_x and image_y (arcsec²/Hz), shape (2, F)."""
    @property
    def co_psd(self) -> _F64:
        """Co-spectrum of image_x with image_y (arcsec²/Hz), shape (F,)."""
    @property
    def cumulative_rms_arcsec(self) -> _F64:
        """Cumulative RMS from the lowest frequency per axis (arcsec), shape (2, F)."""
    @property
    def mode_share(self) -> list[dict[str, object]]:
        """Share of the radial mean square per mode: ``{"label", "frequency_hz", "share"}``."""
    @property
    def input_share(self) -> dict[str, float]:
        """Share of the mean square per disturbance input (e.g. ``"ground_z"``, ``"wind"``)."""
    def p_outside(self, radius_px: float | None = None) -> float:
        """Probability the image is outside ``radius_px`` (px) at a random instant (default: the
        radius given to ``image_motion``, ½ px)."""
    @property
    def budget(self) -> dict[str, object]:
        """The star image budget (Gaussian terms in quadrature, arcsec): ``lines`` (each with
        ``term``, ``label``, ``covariance_arcsec2`` [var_x, var_y, cov_xy], ``fwhm_arcsec`` [x, y],
        ``in_exposure``), ``exposure`` and ``unregistered_stack`` (``fwhm_arcsec``, ``fwhm_px``,
        ``major_fwhm_arcsec``, ``minor_fwhm_arcsec``, ``elongation``, ``major_axis_deg`` from
        sensor x toward y), ``exposure_s``, ``wavelength_nm``, ``notes``."""
    @property
    def peak(self) -> dict[str, object] | None:
        """Expected largest |excursion| per axis in one exposure (Davenport 1964 peak factor):
        ``duration_s``, ``crossing_rate_hz``, ``peak_factor``, ``peak_arcsec``, ``peak_px`` (each
        [x, y]); None without ``exposure_s``."""
    @property
    def unguided_psd(self) -> _F64 | None:
        """PSD of image_x and image_y without the guider (arcsec²/Hz), shape (2, F); None unguided."""
    @property
    def aliased_psd(self) -> _F64 | None:
        """The part of the guided PSD folded in by the guide sampler (arcsec²/Hz), shape (2, F)."""
    def summary(self) -> dict[str, object]:
        """All scalars and small results (RMS, blur per axis, covariance, shares, exposure split,
        budget, peak, guide loop and unguided RMS, dominant band, notes) as a dict; no
        per-frequency arrays."""

_Quantity = Literal["displacement", "velocity", "acceleration", "force", "moment", "angle"]

@final
class Psd:
    """A one-sided power spectral density per Hz (mean square = ∫ S df) on a strictly
    increasing, positive frequency grid, carrying its physical quantity.

    Args:
        freq_hz: grid (Hz), 1-D float64, strictly increasing, finite, > 0.
        values: PSD values (quantity unit²/Hz, e.g. (m/s²)²/Hz), same length, finite, ≥ 0.
        quantity: what the PSD describes.
    """

    def __new__(cls, freq_hz: _F64In, values: _F64In, quantity: _Quantity = "acceleration") -> Psd: ...
    @staticmethod
    def from_csv(path: str | PathLike[str]) -> Psd:
        """Read a PSD CSV file (format: docs of the core's PSD file reader)."""
    @property
    def freq_hz(self) -> _F64:
        """Grid (Hz), shape (n,); a new array (copy) on each access."""
    @property
    def values(self) -> _F64:
        """Values (unit²/Hz), shape (n,); a new array (copy) on each access."""
    @property
    def quantity(self) -> _Quantity: ...
    @property
    def unit(self) -> str:
        """SI unit of the values, e.g. ``"(m/s²)²/Hz"``."""
    def mean_square(self) -> float:
        """∫ S df over the grid by the trapezoid rule (unit²)."""
    def rms(self) -> float:
        """√(mean square) (unit, e.g. m/s²)."""
    def band_rms(self, f_lo_hz: float, f_hi_hz: float) -> float:
        """RMS over [f_lo_hz, f_hi_hz] (Hz), inside the grid."""
    def to(self, quantity: _Quantity) -> Psd:
        """Convert between displacement, velocity and acceleration by powers of (2πf)²."""
    def resample(self, freq_hz: _F64In, *, extrapolate: Literal["error", "zero"] = "error") -> Psd:
        """Log–log interpolation onto ``freq_hz`` (Hz). Outside the grid: error (default) or zero."""
    def check_criterion(self, name: str) -> dict[str, object]:
        """Third-octave band RMS velocity (m/s) against a criterion curve (see
        :func:`criterion_curve`); keys ``band_centre_hz``, ``band_rms_m_s``, ``limit_m_s``,
        ``worst_ratio``, ``worst_band_hz``, ``passes``, ``bands_not_covered_hz``."""
    def __len__(self) -> int: ...

def welch(
    x: _F64In,
    fs: float,
    *,
    nperseg: int = 256,
    noverlap: int | None = None,
    window: str | _F64In | None = None,
    detrend: Literal["constant", "linear", "none", False] | None = None,
) -> tuple[_F64, _F64]:
    """Welch PSD estimate with the meaning of ``scipy.signal.welch`` (one-sided, density).

    Args:
        x: samples (any unit u), 1-D float64.
        fs: sample rate (Hz).
        nperseg: samples per segment; unlike scipy, a value longer than ``x`` is an error.
        noverlap: samples shared by consecutive segments (default ``nperseg // 2``).
        window: "hann", "hamming", "blackman", "blackmanharris", "flattop", "boxcar", or an
            array of ``nperseg`` weights.
        detrend: per-segment trend removal: "constant", "linear", or False / "none".

    Returns:
        ``(f, pxx)``: frequencies (Hz, from 0 to fs/2) and the PSD (u²/Hz), both (nperseg//2 + 1,).
        GIL released during the computation.
    """

def csd(
    x: _F64In,
    y: _F64In,
    fs: float,
    *,
    nperseg: int = 256,
    noverlap: int | None = None,
    window: str | _F64In | None = None,
    detrend: Literal["constant", "linear", "none", False] | None = None,
) -> tuple[_F64, _C128]:
    """Cross spectral density Pxy = conj(X)·Y (meaning of ``scipy.signal.csd``); units u_x·u_y/Hz."""

def coherence(
    x: _F64In,
    y: _F64In,
    fs: float,
    *,
    nperseg: int = 256,
    noverlap: int | None = None,
    window: str | _F64In | None = None,
    detrend: Literal["constant", "linear", "none", False] | None = None,
) -> tuple[_F64, _F64]:
    """Magnitude-squared coherence |Pxy|²/(Pxx Pyy) (meaning of ``scipy.signal.coherence``)."""

def probabilistic_psd(
    x: _F64In | Sequence[_F64In],
    fs: float,
    *,
    block_s: float = ...,
    overlap: float = ...,
    input: str = ...,
    scale: float = ...,
    db_bins: tuple[float, float, float] = ...,
    smoothing_octaves: float = ...,
    step_octaves: float = ...,
    percentiles: Sequence[float] = ...,
    criterion: str | None = ...,
    start_of_day_s: float | None = ...,
    bands_hz: Sequence[tuple[float, float]] = ...,
    band_quantity: str = ...,
) -> Any:
    """Probabilistic PSD (McNamara & Buland 2004 blocks, ObsPy PPSD defaults: 3600 s blocks at
    50 % overlap, 1-octave period averaging in 1/8-octave steps, 1 dB bins from -200 to -50 dB).

    ``x`` is one axis (1-D float64) or a list/tuple of axes (run in parallel); samples times
    ``scale`` measure ``input`` ("velocity" by default). Returns a dict per axis (a list for
    several axes): ``period_s``, ``db_edges``, ``histogram`` (periods × dB bins, uint64),
    ``percentiles`` ({q: dB per period}), ``mean_db``, ``n_blocks``, ``nfft``,
    ``share_below_nlnm``, ``share_above_nhnm``, ``blocks_above_criterion``, ``block_start_s``,
    ``block_db`` (blocks × periods), ``hour_blocks`` (24,), ``hour_band_rms`` (24 × bands).
    """

def quiet_hours(
    path: str | PathLike[str],
    model: Model | None = ...,
    *,
    block_s: float = ...,
    overlap: float = ...,
    bands_hz: Sequence[tuple[float, float]] = ...,
    fs_hz: float | None = ...,
    sensitivity: tuple[float, str] | None = ...,
    channel: str | None = ...,
) -> dict[str, Any]:
    """Quiet hours of a site from one ground recording file (text with ``# start_time=``, WAV or
    miniSEED; ``sensitivity`` = (counts per unit, unit) for counts; a miniSEED file of one to
    three channels on one clock gives one axis each, ``channel`` reads one), read in chunks: a
    probabilistic PSD per ground axis (``axes``: ``percentiles_db`` as [q, dB per period],
    ``mean_db``, ``share_below_nlnm``, ``share_above_nhnm``), ``period_s``, the band RMS over the
    hours of the day (``hour_blocks``, ``hour_band_rms`` [hour][band], SI), and with a ``model``
    (needs ``[optics]``) every block judged through the rig (``blocks``: ``rms_radial_px``,
    ``p_outside``, ``holds``; ``hour_judged``, ``hour_held``) and ``quiet_hours``, the hours in
    which every block holds ½ px. Same numbers as ``stillsky quiet-hours --json``; NaN arrives
    as None."""

def transfer_estimate(
    x: _F64In,
    y: _F64In,
    fs: float,
    *,
    nperseg: int = 256,
    noverlap: int | None = None,
    window: str | _F64In | None = None,
    detrend: Literal["constant", "linear", "none", False] | None = None,
) -> dict[str, object]:
    """Two-channel FRF estimates from input ``x`` (e.g. hammer force, N, or ground motion) to
    output ``y`` (e.g. payload acceleration), both sampled at ``fs`` (Hz), Welch arguments as
    in ``scipy.signal.welch``.

    Returns a dict: ``freq_hz`` (Welch bins above 0 Hz), ``h1`` = Pxy/Pxx (unbiased by noise on
    y), ``h2`` = Pyy/Pyx (unbiased by noise on x), complex, units of y per unit of x;
    ``coherence`` = |Pxy|²/(Pxx Pyy) = |H1/H2|; ``n_segments``. GIL released.
    """

def frf_modes(
    freq_hz: _F64In,
    h: object,
    coherence: _F64In | None = None,
    *,
    min_coherence: float = 0.9,
    min_peak_fraction: float = 0.01,
    band_half_width: float = 0.5,
    min_prominence: float = 1.5,
    max_modes_per_band: int = 4,
) -> list[dict[str, object]]:
    """Natural frequencies and damping from a measured FRF ``h`` (complex, on ``freq_hz`` in Hz).

    Peaks of |h| (among bins with ``coherence`` ≥ ``min_coherence``, at least
    ``min_peak_fraction`` of the largest and ``min_prominence`` times above their band's
    valleys) get bands [f/(1+b), f(1+b)], b = ``band_half_width``; overlapping bands merge and
    each band is fitted by a rational function (Levy's method with Sanathanan–Koerner
    reweighting), one mode per peak. Returns dicts with ``frequency_hz``, ``damping_ratio``,
    ``residue`` (complex, units of h × rad/s), ``band_hz`` and ``fit_error`` (RMS misfit /
    band's max |h|), ascending in frequency.
    """

def calibrate(
    model: Model,
    parameters: dict[str, tuple[float, float]],
    targets: Sequence[float | dict[str, float]],
    *,
    max_iterations: int = 60,
    damping_weight: float = 0.1,
) -> dict[str, object]:
    """Adjust numbers in the model's file so its modes match measured ones.

    Args:
        model: a ``Model`` built from a model file.
        parameters: dotted path → (lower, upper) bounds in the file's units, e.g.
            ``{"mount.tilt_stiffness_nm_per_rad": (5e3, 1e5)}``; arrays by index or by a
            table's ``name``: ``"spring[pad].stiffness_n_per_m"``. See ``model_parameters``.
        targets: measured natural frequencies (Hz), or dicts with ``frequency_hz`` and optional
            ``damping_ratio``, ``mode`` (model mode index, ascending) and ``weight``. Untied
            targets go to the nearest model mode at the starting values.
        max_iterations: Levenberg–Marquardt iterations; damping_weight: weight of damping
            residuals relative to frequency residuals (0.1: a tap gives ζ to about 10 % and f
            to about 0.1–1 %, so a 10 % damping error counts as a 1 % frequency error).

    Returns a dict: ``paths``, ``initial``, ``values``, ``at_bound``, ``residuals`` (per target:
    mode, target/model frequency and damping, relative errors), ``initial_cost``, ``cost``,
    ``iterations``, ``converged``, ``model_toml`` and the fitted ``model``. GIL released.
    """

def model_parameters(model: Model) -> list[str]:
    """Every numeric dotted path in the model's file (what ``calibrate`` can adjust)."""

def reference_ground(name: Literal["nlnm", "nhnm"], freq_hz: _F64In) -> Psd:
    """Peterson (1993) low / high noise model as a ground acceleration PSD ((m/s²)²/Hz) on
    ``freq_hz`` (Hz, inside the model's defined period range)."""

def criterion_curve(name: str) -> tuple[_F64, _F64]:
    """A vibration criterion curve ("workshop", "office", "residential-day",
    "operating-theatre", "vc-a" … "vc-e"): third-octave band centres (Hz) and band RMS
    velocity limits (m/s)."""

def wind_spectrum(
    kind: Literal["kaimal", "kaimal-iec", "von-karman", "davenport"],
    freq_hz: _F64In,
    mean_speed_m_s: float,
    height_m: float,
    *,
    turbulence_intensity: float | None = None,
    roughness_length_m: float | None = None,
    shelter_factor: float = 1.0,
) -> Psd:
    """Along-wind velocity PSD ((m/s)²/Hz) normalised to σ_u².

    Args:
        kind: spectrum shape.
        freq_hz: grid (Hz).
        mean_speed_m_s: mean wind speed U at ``height_m`` (m/s).
        height_m: height above ground (m).
        turbulence_intensity: I_u = σ_u/U in (0, 1]; give this or ``roughness_length_m``, not
            both; with neither, 0.2 (as on the command line).
        roughness_length_m: aerodynamic roughness length z0 (m).
        shelter_factor: factor in (0, 1] on the mean speed.
    """

_UnitToken = Literal["m_s2", "g", "m_s", "mm_s", "um_s", "m", "mm", "um", "arcsec", "px"]

@final
class Series:
    """A recording: samples in SI units (or counts), sample rate and timing report."""

    @property
    def samples(self) -> _F64:
        """Samples, shape (n_frames, n_axes), float64 (a transposed view, no copy)."""
    @property
    def axes(self) -> list[str]:
        """Axis (channel) names."""
    @property
    def fs(self) -> float:
        """Sample rate (Hz): nominal, or the real mean rate when resampled from timestamps."""
    @property
    def unit(self) -> str:
        """SI unit of the samples ("m/s^2", "m/s", "m") or "counts"."""
    @property
    def start_time(self) -> str | None: ...
    @property
    def timing(self) -> dict[str, object]:
        """Timing of the input: ``source`` ("nominal", "time column", "records"), ``fs_hz_mean``,
        ``median_interval_s``, ``jitter_std_s``, ``jitter_max_s`` and their fractions,
        ``n_gaps``, ``gaps`` [(time_s, interval_s)], ``resampled``."""
    def __len__(self) -> int: ...

def read_series(
    path: str | PathLike[str],
    *,
    fs_hz: float | None = None,
    unit: _UnitToken | None = None,
    wav_full_scale: tuple[float, _UnitToken] | None = None,
    sensitivity: tuple[float, _UnitToken] | None = None,
    channel: str | None = None,
    max_jitter_fraction: float | None = None,
    plate_scale_arcsec_per_px: float | None = ...,
) -> Series:
    """Read a recording (CSV/whitespace text, WAV, miniSEED); large files are refused above the
    core's sample limit rather than exhausting memory. GIL released.

    Args:
        path: file path; format from the extension or sniffed from the first bytes.
        fs_hz: sample rate (Hz) for text files without a time column.
        unit: unit of text columns whose name has no unit suffix.
        wav_full_scale: physical value of digital full scale ±1.0, e.g. ``(2.0, "g")``;
            required for WAV (it carries no unit).
        sensitivity: miniSEED counts per unit, e.g. ``(1500.0, "mm_s")``; without it samples
            stay in counts.
        channel: miniSEED channel (``NET.STA.LOC.CHA`` or ``CHA``) when a file holds several.
        max_jitter_fraction: timestamped text: largest |interval − median| / median that is
            still resampled onto a uniform grid (default 0.10); beyond it the reader refuses
            with the measured rate, jitter and gaps.
        plate_scale_arcsec_per_px: image tracks (columns ``*_px`` or ``*_arcsec``): arcsec per
            px; px columns are converted to arcsec with it (required for px). ``unit`` is then
            "arcsec".
    """

def ringdown_card(
    x: _F64In,
    fs: float,
    *,
    plate_scale_arcsec_per_px: float | None = ...,
    threshold: float | None = ...,
    coverage_factor: float = ...,
    min_frequency_hz: float | None = ...,
    max_frequency_hz: float | None = ...,
) -> dict[str, Any]:
    """The ring-down card of one record (a tap test): a damped sine fitted from the first
    excursion on, started from ``identify_ringdown``. GIL released.

    Returns a dict: ``frequency_hz`` and ``damping_ratio`` (each ``value``, ``uncertainty``
    u = √((k σ_fit)² + r²), ``fit_std``, ``method_spread`` r, ``methods``), ``fit``, the
    ``identification``, ``first_excursion`` (units of x; ``first_excursion_arcsec`` and
    ``first_excursion_px`` for an image track in arcsec with a plate scale), ``threshold``
    (default ½ px with a plate scale, else 10 % of the first excursion), ``settle_time_s``
    (samples) and ``settle_time_fit_s`` (fitted envelope), ``warnings``.
    """

def compare_ringdown_cards(
    before: _F64In,
    after: _F64In,
    fs: float,
    *,
    plate_scale_arcsec_per_px: float | None = ...,
    threshold: float | None = ...,
    coverage_factor: float = ...,
) -> dict[str, Any]:
    """Cards of two recordings and their comparison: ``before``, ``after`` and ``comparison``
    (ratios after / before of the first excursion, ζ, f and the settle times;
    ``damping_change_resolved`` when the ζ intervals do not overlap)."""

@final
class SensorResponse:
    """A sensor's response H(s) = k Π(s − z)/Π(s − p) (rad/s, s = 2πi f) with the band where
    removing it is valid."""

    def __new__(
        cls,
        zeros: _F64In,
        poles: _F64In,
        gain: float,
        input: str,
        valid_band_hz: tuple[float, float],
    ) -> SensorResponse:
        """From poles and zeros (rad/s, poles in the left half-plane), gain k, the input
        quantity ("velocity", "acceleration", "displacement") and the valid band (Hz)."""
    @staticmethod
    def geophone(natural_hz: float, damping: float, generator_v_per_m_s: float) -> SensorResponse:
        """A moving-coil geophone, H(s) = G s²/(s² + 2ζω₀s + ω₀²), velocity in; valid from
        where |H| = 0.1 G upward."""
    @staticmethod
    def flat_accelerometer(sensitivity: float, bandwidth_hz: float) -> SensorResponse:
        """A MEMS accelerometer flat to its bandwidth (acceleration in)."""
    @property
    def zeros(self) -> _C128: ...
    @property
    def poles(self) -> _C128: ...
    @property
    def gain(self) -> float: ...
    @property
    def input(self) -> str: ...
    @property
    def valid_band_hz(self) -> tuple[float, float]: ...
    def response(self, freq_hz: _F64In) -> _C128:
        """Complex response at each frequency (Hz)."""
    def remove(self, x: _F64In, fs: float, band: tuple[float, float] | None = ...) -> _F64:
        """Remove the response from a record of the sensor's output within ``band`` (Hz;
        default the valid band up to Nyquist): X/H on the FFT bins inside, zero outside.
        A band outside the valid band raises InvalidInputError naming the limits."""
    def remove_psd(self, freq_hz: _F64In, psd: _F64In, band: tuple[float, float] | None = ...) -> _F64:
        """Remove the response from a PSD of the sensor's output (e.g. V²/Hz) at ``freq_hz``
        (strictly increasing, > 0) within ``band`` (Hz; default the valid band; the high end
        may be ``inf``): S/|H|² inside (the input quantity's PSD), zero outside. A band
        outside the valid band raises InvalidInputError naming the limits."""

def noise_curve(name: str) -> dict[str, Any]:
    """A bundled self-noise curve ("phone-mems", "low-noise-mems", "geophone-4.5hz"):
    ``name``, ``source``, ``freq_hz``, ``psd`` ((m/s²)²/Hz), ``quantity``."""

def noise_floor_check(
    freq_hz: _F64In,
    psd: _F64In,
    quantity: str,
    sensor: str,
    *,
    factor: float | None = ...,
) -> dict[str, Any]:
    """How much of a recorded PSD lies within ``factor`` (PSD, default 4) of a bundled
    sensor's noise floor: ``fraction_at_floor``, ``span_at_floor_hz``, ``warning``."""

def identify_ringdown(
    x: _F64In,
    fs: float,
    *,
    min_frequency_hz: float | None = None,
    max_frequency_hz: float | None = None,
    max_modes: int = 8,
) -> RingdownId:
    """Natural frequencies and damping ratios from a free-decay (tap test) record.

    Args:
        x: samples of the decay (any unit), 1-D float64.
        fs: sample rate (Hz).
        min_frequency_hz, max_frequency_hz: band searched for the dominant peak (Hz).
        max_modes: most modes kept from the matrix-pencil fit.

    Returns:
        ``RingdownId``: ``frequency_hz`` (Hz) and ``damping_ratio`` arrays over the modes
        found, per-method values of the dominant mode (``log_decrement``, ``envelope_fit``,
        ``half_power``, ``spread``, ``methods``), and ``summary()`` (every field as a dict).
        GIL released.
    """

@final
class RingdownId:
    """Result of ``identify_ringdown``."""
    @property
    def frequency_hz(self) -> _F64:
        """Best natural frequency per mode (Hz)."""
    @property
    def damping_ratio(self) -> _F64:
        """Best damping ratio per mode (dimensionless)."""
    @property
    def amplitude(self) -> _F64:
        """Amplitude per mode (units of x)."""
    @property
    def dominant(self) -> int:
        """Index of the dominant mode in the arrays."""
    @property
    def dominant_source(self) -> Literal["single_mode", "matrix_pencil"]: ...
    @property
    def dominant_frequency_hz(self) -> float:
        """Dominant spectral peak (Hz), interpolated."""
    @property
    def log_decrement(self) -> float | None:
        """Damping ratio of the dominant mode by logarithmic decrement."""
    @property
    def log_decrement_cycles(self) -> int: ...
    @property
    def envelope_fit(self) -> float | None:
        """Damping ratio by an exponential fit to the Hilbert envelope."""
    @property
    def half_power(self) -> float | None:
        """Damping ratio by half-power bandwidth of the PSD."""
    @property
    def spread(self) -> float:
        """Spread of the single-mode damping estimates."""
    @property
    def methods(self) -> dict[str, object]:
        """All per-method values of the dominant mode."""
    @property
    def pencil(self) -> list[dict[str, object]]:
        """Matrix-pencil modes (frequency_hz, damped_frequency_hz, damping_ratio, amplitude, phase_rad)."""
    @property
    def close_modes(self) -> bool: ...
    @property
    def clipped(self) -> bool: ...
    @property
    def warnings(self) -> list[str]: ...
    def summary(self) -> dict[str, object]:
        """Every field as a dict (NaN and ±inf as None)."""

def compare_ringdowns(
    before: _F64In,
    after: _F64In,
    fs: float,
    *,
    settle_fraction: float | None = None,
    settle_level: float | None = None,
    min_frequency_hz: float | None = None,
    max_frequency_hz: float | None = None,
    max_modes: int = 8,
) -> RingdownComparison:
    """Two ring-downs (e.g. without and with pads) side by side.

    Args:
        before, after: the records (same unit), 1-D float64, sampled at ``fs`` (Hz).
        settle_fraction: settle threshold as a fraction of the first excursion (default 0.1),
            or settle_level: an absolute threshold (units of x); give at most one.
        min_frequency_hz, max_frequency_hz, max_modes: as in ``identify_ringdown``.

    Returns:
        ``RingdownComparison``: ``before``/``after`` dicts (first_excursion,
        first_excursion_time_s, decay_time_s, settle_time_s, settle_threshold, frequency_hz,
        damping_ratio) and after/before ratios. GIL released.
    """

@final
class RingdownComparison:
    @property
    def before(self) -> dict[str, object]: ...
    @property
    def after(self) -> dict[str, object]: ...
    @property
    def excursion_ratio(self) -> float: ...
    @property
    def decay_time_ratio(self) -> float | None: ...
    @property
    def settle_time_ratio(self) -> float | None: ...
    def summary(self) -> dict[str, object]: ...

@final
class Transient:
    """Output histories of ``Model.transient`` (SI: m or rad)."""
    @property
    def time_s(self) -> _F64:
        """Sample times (s), shape (n,)."""
    @property
    def outputs(self) -> list[str]: ...
    @property
    def values(self) -> _F64:
        """Histories, shape (n_out, n), m or rad."""
    @property
    def fft_len(self) -> int:
        """Padded FFT length used."""
    @property
    def peak_arcsec(self) -> float | None:
        """Largest radial image excursion (arcsec); None without image outputs/optics."""
    @property
    def peak_px(self) -> float | None: ...
    @property
    def peak_time_s(self) -> float | None: ...
    @property
    def radius_px(self) -> float | None: ...
    @property
    def settle_time_s(self) -> float | None:
        """First time (s) from which the image stays within ``radius_px``; None if it ends outside."""
    @property
    def fraction_outside(self) -> float | None: ...
    def __getitem__(self, name: str, /) -> _F64:
        """One output's history (m or rad)."""
    def summary(self) -> dict[str, object]: ...

@final
class ImageTransient:
    """Sensor-plane history of ``Model.image_response`` / ``Model.gust_response``."""
    @property
    def time_s(self) -> _F64: ...
    @property
    def image_x_arcsec(self) -> _F64: ...
    @property
    def image_y_arcsec(self) -> _F64: ...
    @property
    def input_history(self) -> _F64:
        """The history that drove the model (a gust: drag fluctuation, N)."""
    @property
    def plate_scale_arcsec_per_px(self) -> float: ...
    @property
    def peak_arcsec(self) -> float: ...
    @property
    def peak_px(self) -> float: ...
    @property
    def peak_time_s(self) -> float: ...
    @property
    def radius_px(self) -> float: ...
    @property
    def settle_time_s(self) -> float | None: ...
    @property
    def fraction_outside(self) -> float: ...
    def summary(self) -> dict[str, object]: ...

@final
class Gust:
    """A wind-speed fluctuation history u′(t) (m/s) about the mean speed."""
    @staticmethod
    def step(amplitude_m_s: float, *, start_s: float = 0.0) -> Gust:
        """u′ = amplitude (m/s) from ``start_s`` (s) on."""
    @staticmethod
    def one_minus_cosine(
        amplitude_m_s: float,
        *,
        gradient_distance_m: float | None = None,
        duration_s: float | None = None,
        start_s: float = 0.0,
    ) -> Gust:
        """The discrete "1-cosine" gust (A/2)(1 − cos(2π(t − t₀)/T)); give the gust gradient
        distance H (m, T = 2H/U) or the duration T (s)."""
    @staticmethod
    def measured(speed_m_s: _F64In, fs: float) -> Gust:
        """A measured total wind speed (m/s) sampled at ``fs`` (Hz); u′ = speed − mean speed."""
    @staticmethod
    def random(psd: Psd, *, seed: int) -> Gust:
        """A random realisation (random phases, ``seed``) of a velocity ``Psd`` ((m/s)²/Hz)."""
    def velocity_history(self, mean_speed_m_s: float, fs: float, n: int) -> _F64:
        """u′ (m/s) at n samples of ``fs`` (Hz) from t = 0."""

def random_realisation(psd: Psd, fs: float, n: int, *, seed: int) -> _F64:
    """n samples at ``fs`` (Hz) of a zero-mean random realisation of a one-sided PSD (unit²/Hz):
    random phases from ``seed``; variance = Σ S(f_j) Δf over the FFT bins."""

def pier_table(
    outer_diameter_m: Sequence[float],
    wall_m: Sequence[float],
    height_m: Sequence[float],
    material: Sequence[str] = ...,
    *,
    fill_density_kg_m3: float | None = None,
    load_n: float = ...,
    top_mass_kg: float = ...,
    top_inertia_kgm2: float = ...,
    rocking_nm_per_rad: float | None = None,
    soil: str | None = None,
    footing_diameter_m: float | None = None,
) -> dict[str, Any]:
    """Pier sizing table of a round tube column: one row per (outer diameter, wall, height,
    material), outer diameter slowest. Formula and beam-model values side by side.

    Formulas: tilt F L²/(2EI) + F L/k_rock (cantilever tip load plus footing rocking), top
    deflection F L³/(3EI) + F L²/k_rock; first bending and torsion frequencies by Rayleigh's
    method (tip mass plus 33/140 of the column mass for bending alone; tip inertia plus a third
    of the column's polar mass moment for torsion). The model values come from a 16-element
    beam with the top mass as a body (static tilt from its FRF at a low frequency, frequencies
    from its modes). A fill adds mass in bending only.

    Args:
        outer_diameter_m, wall_m, height_m: lists (m); a wall of half the diameter is solid.
        material: preset names (see ``docs/model-file.md``); default ``["steel-s235"]``.
        fill_density_kg_m3: density of a fill inside the tube.
        load_n: horizontal load at the top, default 22.0 N, a figure of pier-design practice
            (common practice, no source).
        top_mass_kg, top_inertia_kgm2: mount plus payload, and its inertia about the vertical
            axis; defaults 40.0 kg and 1.0 kg·m², placeholders: give yours.
        rocking_nm_per_rad: footing rocking stiffness; or ``soil`` (a soil preset) with
            ``footing_diameter_m`` (a round surface footing); neither: a rigid base.

    Returns:
        A dict of float64 arrays, one entry per row, keyed ``outer_diameter_m``, ``wall_m``,
        ``height_m``, ``fill_density_kg_m3``, ``bending_stiffness_nm2``,
        ``torsion_stiffness_nm2``, ``column_mass_kg``, ``rocking_nm_per_rad`` (inf for a rigid
        base), ``tilt_column_arcsec``, ``tilt_rocking_arcsec``, ``tilt_arcsec``,
        ``deflection_m``, ``bending_hz``, ``torsion_hz``, ``model_tilt_arcsec``,
        ``model_deflection_m``, ``model_bending_hz``, ``model_torsion_hz``; ``material`` (a
        list of names) and the scalars ``load_n``, ``top_mass_kg``, ``top_inertia_kgm2``.

    Raises:
        InvalidInputError: an empty list, a non-positive size, a wall over half the diameter,
            an unknown material or soil, a bad load or mass (the message names the argument).
    """

def static_checks(
    model_or_path: Model | str | PathLike[str],
    *,
    design_wind_m_s: float = 10.0,
    gust_factor: float = 2.0,
    air_density_kg_m3: float = 1.225,
    top_load_n: float = ...,
    foot_surface: str | None = None,
) -> StaticChecks:
    """Static checks of a rig: the weight at the real centre of gravity and the design wind's
    resultant (every 1° of direction); tripod foot reactions, leeward-leg axial stress and
    buckling (pinned–pinned, K = 1), tipping about the line through two feet, sliding of the
    feet; pier stress and buckling under the base moment, anchor-bolt tension and footing
    overturning.

    Args:
        model_or_path: a rig model file (path) or a ``Model`` built from one.
        design_wind_m_s: mean design wind speed (m/s).
        gust_factor: factor on the mean drag for gusts (dimensionless).
        air_density_kg_m3: ρ (kg/m³).
        top_load_n: horizontal load at a pier's top with the wind (N; default 22 N, the core's
            ``pier_table`` default, common practice).
        foot_surface: foot and surface for sliding (e.g. ``"rubber-on-paver"``), overriding
            ``tripod.foot_surface``; an unknown name raises ``ValueError`` listing the known ones.

    Returns:
        ``StaticChecks``: a sequence of dicts (name, value = demand, limit = capacity, unit,
        factor_of_safety, verdict "pass" | "marginal" | "fail"), ``notes`` and ``cautions``.
        Estimates only: heavy rigs and piers can injure; follow local building codes and a
        licensed engineer for piers, footings and observatory structures.
    """

@final
class StaticChecks:
    def __len__(self) -> int: ...
    def __getitem__(self, i: int, /) -> dict[str, object]: ...
    @property
    def checks(self) -> list[dict[str, object]]: ...
    @property
    def verdict(self) -> Literal["pass", "marginal", "fail"]:
        """The worst verdict."""
    @property
    def min_factor_of_safety(self) -> float: ...
    @property
    def notes(self) -> list[str]:
        """Figures without a capacity and checks skipped for want of input."""
    @property
    def cautions(self) -> str:
        """The cautions that go with every report, one per line."""
    def summary(self) -> dict[str, object]: ...
def spring_variants(
    model: Model,
    springs: list[str],
    replacements_json: str,
    freq_hz: npt.ArrayLike,
    input: str | list[str],
    output: str | list[str],
    *,
    input_psd: npt.ArrayLike,
    frf: bool = True,
) -> tuple[npt.NDArray[np.complex128] | None, npt.NDArray[np.float64]]:
    """Replace named rank-one springs by each variant's stiffness models.

    Up to four springs: a rational form in the stiffness changes, computed once per frequency;
    where it would lose accuracy (near a resonance), and for more springs, a rank-k (Woodbury)
    update of the base solve. Both are tested against rebuilt models solved directly (1e-9).

    Args:
        model: the base model; `springs` names its rank-one springs to replace.
        replacements_json: JSON list of variants, each a list (one per spring) of stiffness
            tables as in the model file, e.g. ``[[{"hysteretic": {"k": 1e6, "loss_factor": 0.1}}]]``.
        freq_hz: the grid (Hz, strictly increasing, > 0).
        input, output: input and output names (one or a list each).
        input_psd: one-sided input PSD on `freq_hz` for the RMS (unit²/Hz, ≥ 0).
        frf: False skips storing the FRFs (same arithmetic, memory independent of the number of
            variants and frequencies); ranking specs needs only the RMS.

    Returns:
        FRFs, shape (n_variant, n_freq, n_out, n_in), or None when `frf` is False, and RMS
        responses sqrt(∫|H|²S df) (trapezoid rule), shape (n_variant, n_out, n_in). The GIL is
        released.
    """

# --- isolator sweep (stillsky.sweep in _sweep.py is the public entry; these are its parts) ---

def sweep_rows(
    model_text: str,
    model_name: str,
    catalogue_text: str,
    catalogue_name: str,
    spectra: list[str],
    wind: list[str],
    *,
    labels: list[str] | None = None,
    f_min_hz: float | None = None,
    f_max_hz: float | None = None,
    n_freq: int | None = None,
    pad_prefix: str | None = None,
    ground_scale: list[float] | None = None,
    fs_hz: float | None = None,
    threads: int | None = None,
    temperature_c: float | None = None,
) -> list[dict[str, object]]:
    """Rows of an isolator sweep (catalogue × spectra × wind cases), GIL released.

    Args:
        model_text, model_name: model file TOML (a rig with [tripod] or a generic layer with
            pad springs) and the name used in messages.
        catalogue_text, catalogue_name: isolator catalogue TOML and its name.
        spectra: recording / PSD file paths, or ``nlnm`` / ``nhnm``.
        wind: wind cases, ``calm`` or ``SPEED[:HEIGHT[:SPECTRUM[:INTENSITY]]]``; empty: calm.
        labels: ground labels (one per spectrum, unique) instead of the file stems.
        f_min_hz, f_max_hz, n_freq: log analysis grid (defaults 0.2, 100, 600: the report's).
        pad_prefix: prefix of the pad springs in a generic model (default ``pad``).
        ground_scale: per-axis factor on PSD files and reference models.
        fs_hz: sample rate of text recordings without a time column or ``# fs_hz=`` line.
        threads: threads of the sweep's own pool (default: all cores).
        temperature_c: the night's temperature (°C): pads with a ``temperature`` table take
            their values at it, linear between rows, refused outside (default 20, as written).

    Returns:
        one dict per row with the keys of ``sweep_columns()``; NaN where the CSV is empty,
        ``worse_than_none``/``overloaded`` bool or None, ``error`` None on a good row. A
        recording that cannot be read gives an error row per combination naming file and line.
    """

def sweep_plan(
    model_text: str,
    model_name: str,
    catalogue_text: str,
    catalogue_name: str,
    spectra: list[str],
    wind: list[str],
    *,
    f_min_hz: float | None = None,
    f_max_hz: float | None = None,
    n_freq: int | None = None,
    pad_prefix: str | None = None,
    ground_scale: list[float] | None = None,
    fs_hz: float | None = None,
    threads: int | None = None,
    temperature_c: float | None = None,
) -> dict[str, list[str]]:
    """Check a sweep without reading any spectrum: ``{"labels", "winds", "specs"}``."""

def catalogue_toml(entries_json: str, source: str) -> str:
    """Catalogue TOML from a JSON list of isolator entries (validated)."""

def catalogue_parts(text: str, name: str, per_part: int) -> list[str]:
    """The catalogue's entries in parts of at most ``per_part``, each as catalogue TOML."""

def sweep_csv(rows: list[dict[str, object]]) -> str:
    """The command-line sweep's CSV text for these rows (six significant digits)."""

def sweep_error_row(spec: str, spectrum: str, wind: str, reason: str) -> dict[str, object]:
    """An error row for one combination."""

def sweep_columns() -> list[str]:
    """The sweep table's column names, in order."""

def sweep_key(spec: str, spectrum: str, wind: str) -> str:
    """The key of one combination (``spec|spectrum|wind``), as sweep rows carry it."""

def footfall_force(
    fs_hz: float,
    n: int,
    *,
    mass_kg: float = ...,
    pace_hz: float = ...,
    footfall: str = "fixed",
    start_s: float = 0.0,
    duration_s: float | None = None,
) -> npt.NDArray[np.float64]:
    """The downward walking force (N) of a person, ``n`` samples at ``fs_hz`` from t = 0.

    W[1 + Σ α_h cos(2π h f_p t)] for h = 1…4, faded in and out over one step; ``footfall``
    ``"fixed"`` (α = 0.5, 0.2, 0.1, 0.05; Murray, Allen & Ungar 1997) or ``"pace"`` (growing
    with the pace; Young 2001). Defaults: 75 kg, 2 Hz (common practice); ``duration_s`` None
    runs past the record.
    """

def walking_pass(
    model: Model,
    deck: str = "floor",
    at_m: tuple[float, float] = ...,
    *,
    mass_kg: float = ...,
    pace_hz: float = ...,
    footfall: str = "fixed",
    duration_s: float = ...,
    fs_hz: float = ...,
) -> dict[str, Any]:
    """Image motion while a person treads at ``at_m`` (x, y in m; default (1, 0)) on body ``deck``
    (defaults 75 kg, 2 Hz pace).

    The force enters as ``force:DECK:z@X,Y,Z`` and runs through the FFT transient (0.5 s of
    rest before, 2 s after; defaults 10 s at 400 Hz). Returns ``time_s``, ``force_n``,
    ``image_x_arcsec``, ``image_y_arcsec`` (arrays), ``point_m``, ``peak_arcsec``, ``peak_px``,
    ``peak_time_s`` (the weight's tilt included) and ``rms_arcsec``, ``rms_px`` (radial RMS
    about the mean over the pass).
    """

def footfall_steady(
    model: Model,
    deck: str = "floor",
    at_m: tuple[float, float] = ...,
    *,
    mass_kg: float = ...,
    pace_hz: float = ...,
    footfall: str = "fixed",
) -> dict[str, Any]:
    """Steady walking in place at ``at_m`` (x, y in m; default (1, 0)) on body ``deck``: each
    force line α_h W at h f_p through the FRF (defaults 75 kg, 2 Hz pace).

    Returns ``frequency_hz``, ``force_n``, ``image_rms_arcsec`` (one per harmonic, arrays) and
    the total ``rms_arcsec``, ``rms_px``.
    """

def tone_image(model: Model, lines: Sequence[str]) -> dict[str, Any]:
    """Tonal disturbance lines carried to the image through the FRF at each line's frequency.

    Each line is ``"FREQ_HZ:INPUT:RMS_AMPLITUDE:UNIT"``, e.g. ``"24:ground_z:1e-6:m_s"`` or
    ``"50:force:deck:z@1,0,0.1:2:N"``; units ``m``, ``m_s``, ``m_s2`` (ground translation),
    ``rad`` (ground rotation), ``N`` (force), ``N_m`` (moment). The amplitude is the RMS (a
    sinusoid of peak ``a`` has RMS ``a/√2``); a line adds ``|H(f0)|² A²`` to the mean square.

    Returns per line (arrays, lists for ``input`` and ``unit``): ``frequency_hz``, ``input``,
    ``amplitude_rms``, ``unit``, ``input_amplitude_rms`` (m, rad, N or N·m),
    ``image_x_rms_arcsec``, ``image_y_rms_arcsec``, ``line_rms_arcsec``, ``line_rms_um``,
    ``line_rms_px``, ``share``; and the totals ``rms_arcsec``, ``rms_um``, ``rms_px``.
    """

def ground_distance_ratio(
    freq_hz: Sequence[float],
    from_m: float,
    to_m: float,
    *,
    wave: str = "surface",
    loss_factor: float = ...,
    wave_speed_m_s: float = ...,
) -> _F64:
    """Amplitude ratio of ground vibration carried from ``from_m`` to ``to_m`` from its source.

    Bornitz (1931): ``(r1/r2)**n * exp(-pi f eta (r2 - r1) / c)``, ``n`` 0.5 for ``surface``,
    1 for ``body``, 2 for ``body-at-surface`` waves; ``loss_factor`` eta (default 0.1) and
    ``wave_speed_m_s`` c (default 200). A PSD scales with the ratio squared. A rough estimate.
    """

def standing_tilt(
    model: Model,
    distances_m: Sequence[float],
    deck: str = "floor",
    *,
    mass_kg: float = ...,
    azimuth_deg: float | None = None,
    limit_px: float = ...,
) -> dict[str, Any]:
    """Static image angle when a person stands on ``deck`` at each distance (m, increasing)
    from the stand's axis, along ``azimuth_deg`` (from north through east) or, with None, the
    worst azimuth. Defaults 75 kg, limit ½ px.

    Returns ``distance_m``, ``azimuth_deg``, ``image_arcsec``, ``image_px``,
    ``deck_tilt_arcsec`` (arrays), ``weight_n``, ``crossings_m`` (where the image crosses the
    limit), ``under_within_m`` and ``under_beyond_m`` (None when not applicable).
    """

@final
class MonitorReading:
    """One reading of a :class:`Monitor` (as of its last tick)."""

    @property
    def state(self) -> Literal["quiet", "above", "unsafe"]:
        """``"quiet"`` (fresh, valid, flag off), ``"above"`` (flag on) or ``"unsafe"`` (no
        trustworthy reading: treat as not quiet)."""
    @property
    def reason(self) -> Literal["none", "warming_up", "bad_sample", "gap", "stale"]:
        """Why the reading is unsafe (``"none"`` when it is not)."""
    @property
    def rms_arcsec(self) -> float:
        """Radial RMS image motion over the window (arcsec); NaN while warming up."""
    @property
    def rms_x_arcsec(self) -> float:
        """RMS of image_x over the window (arcsec)."""
    @property
    def rms_y_arcsec(self) -> float:
        """RMS of image_y over the window (arcsec)."""
    @property
    def rms_px(self) -> float:
        """Radial RMS in pixels."""
    @property
    def last_sample_time_s(self) -> float:
        """Time of the newest sample (s, caller's clock); NaN before the first."""
    @property
    def age_s(self) -> float:
        """``now`` of the last tick minus ``last_sample_time_s`` (s); NaN before both exist."""

@final
class ExposureQuality:
    """The image motion of one exposure (from :meth:`Monitor.exposure_end`)."""

    @property
    def duration_s(self) -> float: ...
    @property
    def rms_arcsec(self) -> float:
        """Radial RMS over the valid samples of the exposure (arcsec); NaN if none."""
    @property
    def rms_px(self) -> float: ...
    @property
    def max_window_rms_arcsec(self) -> float:
        """Largest windowed RMS seen during the exposure (arcsec); NaN if none."""
    @property
    def coverage(self) -> float:
        """Valid samples counted / samples the duration implies (at most 1)."""
    @property
    def above_fraction(self) -> float:
        """Fraction of the counted samples during which the flag was on."""

@final
class Monitor:
    """Streaming image-motion monitor: accelerometer samples (m/s²) in, image motion out.

    The core's monitor (the same code as the C API's ``stillsky_monitor``): one FIR filter per
    channel × image axis designed from the model's image FRF over −ω² (or a measured
    calibration) with a 4th-order Butterworth high-pass at ``highpass_hz``; a running RMS over
    ``window_s``; a flag that turns on above ``threshold_arcsec`` and off below
    ``threshold_arcsec × (1 − hysteresis)`` once it has been on ``hold_off_s``; UNSAFE while
    warming up (``fir_taps`` + window samples), after a NaN sample or a gap, and when the newest
    sample is older than ``max_age_s`` at a tick. It only reports; it commands nothing.

    Settings left ``None`` take the defaults: 200 Hz, 10 s window, 1 arcsec, hysteresis 0.2,
    hold-off 2 s, max age 0.5 s, high-pass 1 Hz, 1024 taps (typical starting values, not advice
    for a given rig). Single producer: a second thread calling into a monitor that is busy gets
    ``RuntimeError`` (already borrowed); ``push`` releases the GIL.
    """

    @staticmethod
    def from_model(
        model: Model,
        axes: str,
        *,
        sample_rate_hz: float | None = None,
        window_s: float | None = None,
        threshold_arcsec: float | None = None,
        hysteresis: float | None = None,
        hold_off_s: float | None = None,
        max_age_s: float | None = None,
        highpass_hz: float | None = None,
        fir_taps: int | None = None,
    ) -> Monitor:
        """A monitor for ``model``'s image motion (needs ``[optics]``) from accelerometers along
        the ground axes ``axes`` (``"z"``, ``"xy"``, ``"xyz"``..., in the order of the columns
        given to :meth:`push`)."""
    @staticmethod
    def from_calibration(
        freq_hz: _F64In,
        frf: npt.ArrayLike,
        plate_scale_arcsec_per_px: float,
        *,
        sample_rate_hz: float | None = None,
        window_s: float | None = None,
        threshold_arcsec: float | None = None,
        hysteresis: float | None = None,
        hold_off_s: float | None = None,
        max_age_s: float | None = None,
        highpass_hz: float | None = None,
        fir_taps: int | None = None,
    ) -> Monitor:
        """A monitor from a measured accelerometer-to-image FRF ``frf`` (rad per m/s², complex,
        shape (n_freq, 2 image axes, n_axes)) on ``freq_hz``; interpolated linearly, zero
        outside the grid."""
    def push(self, t0_s: float, samples: _F64In) -> None:
        """Feed samples (m/s²), shape (n, n_axes) or (n,) for one channel, the first taken at
        ``t0_s`` (s, the caller's clock; the rest at 1/fs). A C-contiguous float64 array is read
        in place. A jump of more than half a sample in time is a gap (UNSAFE until refilled); a
        time going backwards raises ``InvalidInputError``; a non-finite sample refuses the block,
        restarts the filters (UNSAFE, ``"bad_sample"``) and raises ``InvalidInputError``."""
    def tick(self, now_s: float) -> MonitorReading:
        """Set the clock to ``now_s`` and return the reading (staleness is judged here: call it
        even when no data arrive)."""
    def reading(self) -> MonitorReading:
        """The reading as of the last tick (no clock update)."""
    def exposure_begin(self, t_s: float) -> None:
        """Open an exposure at ``t_s``; samples whose motion time (sample time − latency) is at
        or after ``t_s`` count. ``InvalidInputError`` if one is open."""
    def exposure_end(self, t_s: float) -> ExposureQuality:
        """Close the open exposure at ``t_s`` (push data up to ``t_s + latency_s`` first)."""
    def reset(self) -> None:
        """Clear filters, window, flag, clock and any open exposure (UNSAFE, warming up)."""
    def fir(self, image_axis: int, channel: int) -> _F64:
        """A copy of the FIR taps (arcsec per m/s²) from ``channel`` to image axis
        ``image_axis`` (0 = x, 1 = y), shape (fir_taps,)."""
    @property
    def n_axes(self) -> int: ...
    @property
    def fir_taps(self) -> int: ...
    @property
    def window_samples(self) -> int: ...
    @property
    def warmup_samples(self) -> int:
        """Samples needed after a restart before the reading is valid (taps + window)."""
    @property
    def latency_s(self) -> float:
        """Delay of the estimate behind the data (s) = (taps/8)/fs."""
    @property
    def plate_scale_arcsec_per_px(self) -> float: ...
    @property
    def sample_rate_hz(self) -> float: ...
    @property
    def threshold_arcsec(self) -> float: ...

# --- design studies (stillsky.study in _study.py is the public entry; StudyPlan is its part) ---
@final
class StudyPlan:
    """A loaded study: the study file and every file it names, read once."""

    def __new__(cls, text: str, name: str, folder: str | PathLike[str]) -> StudyPlan:
        """Load study text (``name`` for messages); file names are relative to ``folder``."""
    def columns(self) -> list[str]:
        """The CSV columns, in order: key, variant, one per variable, then the outcomes."""
    def variants(self) -> list[str]:
        """The variants' labels, in row order (``base`` first)."""
    def disturbances(self) -> tuple[list[str], list[str]]:
        """The ground labels and the wind labels, in row order."""
    def rows(self, which: Sequence[int] | None = None, threads: int | None = None) -> list[dict[str, Any]]:
        """Rows of the variants ``which`` (indices into ``variants()``; None: all), in row
        order, at full precision; the interpreter is released."""
    def csv(self, rows: Iterable[dict[str, Any]]) -> str:
        """The command line's CSV text of these rows (six significant digits)."""
