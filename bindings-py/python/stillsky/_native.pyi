"""Type stubs and user documentation for the extension module ``stillsky._native``.

Conventions: SI units (m, kg, s, N, rad); frequencies in Hz; harmonic convention e^{+iωt};
complex stiffness k* = k'(1 + iη); dynamic stiffness Z(ω) = K*(ω) + iωC − ω²M.

Array arguments are float64 and 1-D. NumPy float64 arrays are read in place (one copy when not
C-contiguous); lists and tuples are converted once; a NumPy array of another dtype raises
``TypeError``. Results are new arrays owned by NumPy (no copy on the way out). Heavy calls
release the GIL: do not modify an input array from another thread during a call.
"""

from os import PathLike
from typing import Literal, Sequence, overload

import numpy as np
import numpy.typing as npt

__version__: str

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
    def __len__(self) -> int: ...

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
    def from_toml(path: str | PathLike[str]) -> Model:
        """Read a TOML model file.

        Args:
            path: file path.

        Raises:
            StillskyIOError: the file cannot be read (also an ``OSError``).
            InvalidInputError: malformed file, unknown key (message names file and line),
                bad values (message names the field).
            UnsupportedModelError: e.g. a body free to move (named).
        """
    @staticmethod
    def from_toml_str(text: str, label: str = "<string>") -> Model:
        """Build a model from TOML text.

        Args:
            text: the model file contents.
            label: name of the source used in error messages (e.g. a file name).
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
        ground: Psd | Sequence[Psd | None] | None = None,
        loads: Sequence[tuple[str, Psd]] | None = None,
        exposure_s: float | None = None,
        guide_cadence_s: float | None = None,
        guide_gain: float = 0.5,
        radius_px: float | None = None,
        seeing_fwhm_arcsec: float | None = None,
        mode_shares: bool = True,
    ) -> dict[str, object]:
        """Image motion on the sky and sensor under uncorrelated disturbances (needs [optics]).

        Args:
            freq_hz: evaluation grid (Hz), 1-D float64, strictly increasing, > 0.
            ground: ground-motion PSD (displacement, velocity or acceleration), one ``Psd`` for
                all three axes or one per axis x, y, z (``None`` = no motion on that axis).
                Spectra are resampled log–log onto ``freq_hz`` and taken as zero outside their
                own range (reported in ``notes``).
            loads: (input name, force PSD N²/Hz or moment PSD (N·m)²/Hz) pairs, e.g.
                ``("force:payload:x", psd)``.
            exposure_s: split the motion into centroid wander and smear for exposures of this
                length (s).
            guide_cadence_s: guider exposure cadence (s); with ``guide_gain`` (integrator gain
                in (0, 2)) applies the guider's rejection.
            radius_px: radius (pixels) for the probability of leaving it (default ½ pixel).
            seeing_fwhm_arcsec: seeing FWHM (arcsec); default from the model's optics.
            mode_shares: compute each mode's share of the mean square.

        Returns:
            dict with ``rms_arcsec``, ``rms_um``, ``rms_px``, ``per_axis_arcsec``,
            ``p_outside``, ``radius_px``, ``plate_scale_arcsec_per_px``, ``blur_fwhm_arcsec``,
            ``total_fwhm_arcsec``, ``covariance_arcsec2``, ``mode_share``, ``input_share``,
            ``exposure``, ``dominant_band_hz``, ``dominant_band_share``, ``notes`` and the arrays
            ``freq_hz`` (F,), ``psd_arcsec2`` (2, F) for image_x / image_y (arcsec²/Hz),
            ``co_psd_arcsec2`` (F,), ``cumulative_rms_arcsec`` (2, F). GIL released.
        """

_Quantity = Literal["displacement", "velocity", "acceleration", "force", "moment", "angle"]

class Psd:
    """A one-sided power spectral density per Hz (mean square = ∫ S df) on a strictly
    increasing, positive frequency grid, carrying its physical quantity.

    Args:
        freq_hz: grid (Hz), 1-D float64, strictly increasing, finite, > 0.
        values: PSD values (quantity unit²/Hz, e.g. (m/s²)²/Hz), same length, finite, ≥ 0.
        quantity: what the PSD describes.
    """

    def __init__(self, freq_hz: _F64In, values: _F64In, quantity: _Quantity = "acceleration") -> None: ...
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
    window: str | _F64In = "hann",
    detrend: Literal["constant", "linear", "none", False] = "constant",
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
    window: str | _F64In = "hann",
    detrend: Literal["constant", "linear", "none", False] = "constant",
) -> tuple[_F64, _C128]:
    """Cross spectral density Pxy = conj(X)·Y (meaning of ``scipy.signal.csd``); units u_x·u_y/Hz."""

def coherence(
    x: _F64In,
    y: _F64In,
    fs: float,
    *,
    nperseg: int = 256,
    noverlap: int | None = None,
    window: str | _F64In = "hann",
    detrend: Literal["constant", "linear", "none", False] = "constant",
) -> tuple[_F64, _F64]:
    """Magnitude-squared coherence |Pxy|²/(Pxx Pyy) (meaning of ``scipy.signal.coherence``)."""

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
        turbulence_intensity: I_u = σ_u/U in (0, 1]; give this or ``roughness_length_m``.
        roughness_length_m: aerodynamic roughness length z0 (m).
        shelter_factor: factor in (0, 1] on the mean speed.
    """

def read_series(path: str | PathLike[str], *, fs_hz: float | None = None) -> dict[str, object]:
    """Read a recording (CSV/whitespace text, WAV, miniSEED).

    Args:
        path: file path.
        fs_hz: sample rate (Hz) for text files without a time column.

    Returns:
        ``{"samples": (n_axes, n_frames) float64 in SI units, "axis_names": list[str],
        "fs_hz": float, "unit": str, "start_time": str | None}``.
    """

def identify_ringdown(
    x: _F64In,
    fs: float,
    *,
    min_frequency_hz: float | None = None,
    max_frequency_hz: float | None = None,
    max_modes: int = 8,
) -> dict[str, object]:
    """Natural frequencies and damping ratios from a free-decay (tap test) record.

    Args:
        x: samples of the decay (any unit), 1-D float64.
        fs: sample rate (Hz).
        min_frequency_hz, max_frequency_hz: band searched for the dominant peak (Hz).
        max_modes: most modes kept from the matrix-pencil fit.

    Returns:
        dict with arrays ``frequency_hz``, ``damping_ratio``, ``amplitude`` (units of x),
        ``dominant`` (index), ``methods`` (single-mode estimates: log decrement, envelope fit,
        half power), ``clipped``, ``close_modes``, ``warnings`` and more diagnostics.
        GIL released.
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
) -> list[dict[str, object]]:
    """Rows of an isolator sweep (catalogue × spectra × wind cases), GIL released.

    Args:
        model_text, model_name: model file TOML (a rig with [tripod] or a generic layer with
            pad springs) and the name used in messages.
        catalogue_text, catalogue_name: isolator catalogue TOML and its name.
        spectra: recording / PSD file paths, or ``nlnm`` / ``nhnm``.
        wind: wind cases, ``calm`` or ``SPEED[:HEIGHT[:SPECTRUM[:INTENSITY]]]``; empty: calm.
        labels: ground labels (one per spectrum, unique) instead of the file stems.
        f_min_hz, f_max_hz, n_freq: log analysis grid (defaults 0.5, 90, 300).
        pad_prefix: prefix of the pad springs in a generic model (default ``pad``).
        ground_scale: per-axis factor on PSD files and reference models.
        fs_hz: sample rate of text recordings without a time column or ``# fs_hz=`` line.
        threads: threads of the sweep's own pool (default: all cores).

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
