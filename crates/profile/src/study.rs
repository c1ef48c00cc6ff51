//! The study profile schema (RON). Frequencies are ordinary frequencies nu in Hz,
//! times in s, named in each field; the engine's rad/s come from 2 pi nu.

use serde::{Deserialize, Serialize};

/// The newest profile format this build writes and reads.
pub const FORMAT_VERSION: u32 = 3;

/// Format versions: 1 kept the generator's rate and bits in `trap`; 2 moved them into
/// the `generator` section with the drive calibration, full scale and analog chain; 3
/// added the trap model (`trap.model`: the particle and every axis the control moves,
/// with its well shape). Older files are upgraded on load (see
/// [`crate::storage::parse_study`]): a version-2 file is a version-3 file without a
/// model, i.e. one harmonic axis.
pub const OLDEST_FORMAT_VERSION: u32 = 1;

/// One study: a trap, candidate ramps, the initial state, noise and an optional cycle.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Study {
    /// Profile format version (see [`FORMAT_VERSION`]).
    pub format_version: u32,
    /// Name of the study.
    pub name: String,
    /// Free notes.
    pub notes: String,
    /// Units the app shows values in.
    pub display: DisplayUnits,
    /// The apparatus: end frequencies and limits.
    pub trap: TrapSpec,
    /// State before every ramp, given at the ramp's start frequency.
    pub initial_state: InitialStateSpec,
    /// Noise during ramps.
    pub noise: NoiseSpec,
    /// Verdict tolerance on Q* - 1 (> 0).
    pub tolerance: f64,
    /// Candidate ramps.
    pub candidates: Vec<CandidateRamp>,
    /// Optional Otto cycle built from two candidates (or ideal strokes) and two baths.
    pub cycle: Option<CycleSpec>,
    /// The waveform generator and drive chain that play the ramps (format 2 on).
    pub generator: Option<GeneratorSpec>,
}

impl Default for Study {
    fn default() -> Self {
        Self {
            format_version: FORMAT_VERSION,
            name: "Untitled study".into(),
            notes: String::new(),
            display: DisplayUnits::default(),
            trap: TrapSpec::default(),
            initial_state: InitialStateSpec::Thermal { occupation: 0.0 },
            noise: NoiseSpec::default(),
            tolerance: 1e-3,
            candidates: Vec::new(),
            cycle: None,
            generator: None,
        }
    }
}

impl Study {
    /// The candidate with this name.
    pub fn candidate(&self, name: &str) -> Option<&CandidateRamp> {
        self.candidates.iter().find(|c| c.name == name)
    }
}

/// Display unit of frequency. Files spell it as in SI (`Hz`, `kHz`, `MHz`); the
/// first versions' `KHz` still loads.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
pub enum FrequencyUnit {
    /// Hz.
    Hz,
    /// kHz.
    #[default]
    #[serde(rename = "kHz", alias = "KHz")]
    KHz,
    /// MHz.
    MHz,
}

impl FrequencyUnit {
    /// Every unit, smallest first.
    pub const ALL: [Self; 3] = [Self::Hz, Self::KHz, Self::MHz];

    /// Hz per unit (SI brochure, BIPM 2019).
    pub fn hz(self) -> f64 {
        match self {
            Self::Hz => 1.0,
            Self::KHz => 1e3,
            Self::MHz => 1e6,
        }
    }

    /// The SI symbol, as files spell it and the app shows it.
    pub fn symbol(self) -> &'static str {
        match self {
            Self::Hz => "Hz",
            Self::KHz => "kHz",
            Self::MHz => "MHz",
        }
    }
}

/// Display unit of time. Files spell it as in SI (`ns`, `us`, `ms`, `s`); the first
/// versions' `Ns`, `Us`, `Ms` still load (`Ms` was milliseconds).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
pub enum TimeUnit {
    /// ns.
    #[serde(rename = "ns", alias = "Ns")]
    Ns,
    /// µs.
    #[default]
    #[serde(rename = "us", alias = "Us")]
    Us,
    /// ms.
    #[serde(rename = "ms", alias = "Ms")]
    Ms,
    /// s.
    #[serde(rename = "s", alias = "S")]
    S,
}

impl TimeUnit {
    /// Every unit, smallest first.
    pub const ALL: [Self; 4] = [Self::Ns, Self::Us, Self::Ms, Self::S];

    /// Seconds per unit (SI brochure, BIPM 2019).
    pub fn seconds(self) -> f64 {
        match self {
            Self::Ns => 1e-9,
            Self::Us => 1e-6,
            Self::Ms => 1e-3,
            Self::S => 1.0,
        }
    }

    /// The SI symbol as the app shows it (µs; files write `us`).
    pub fn symbol(self) -> &'static str {
        match self {
            Self::Ns => "ns",
            Self::Us => "µs",
            Self::Ms => "ms",
            Self::S => "s",
        }
    }
}

/// How the app shows numbers.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(default)]
pub struct DisplayUnits {
    /// Frequency unit (ordinary frequency).
    pub frequency: FrequencyUnit,
    /// Time unit.
    pub time: TimeUnit,
    /// Show omega/omega_i and t omega_i instead.
    pub dimensionless: bool,
}

/// The apparatus.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct TrapSpec {
    /// Start frequency nu_i, Hz (> 0).
    pub start_frequency_hz: f64,
    /// End frequency nu_f, Hz (> 0).
    pub end_frequency_hz: f64,
    /// Lowest playable frequency, Hz.
    pub lowest_frequency_hz: Option<f64>,
    /// Highest playable frequency, Hz.
    pub highest_frequency_hz: Option<f64>,
    /// Largest |d nu/dt|, Hz/s.
    pub slew_limit_hz_per_s: Option<f64>,
    /// The trap as the lab has it: the particle and every axis the control moves.
    /// `None`: one ideal harmonic axis (the ramp's own). The frequencies and limits
    /// above are those of the reference axis, the one the ramp is drawn for.
    pub model: Option<TrapModelSpec>,
}

impl Default for TrapSpec {
    fn default() -> Self {
        Self {
            start_frequency_hz: 100e3,
            end_frequency_hz: 25e3,
            lowest_frequency_hz: None,
            highest_frequency_hz: None,
            slew_limit_hz_per_s: None,
            model: None,
        }
    }
}

/// The particle and the axes of a trap (format 3 on).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct TrapModelSpec {
    /// The trapped particle; needed by optical well shapes (their depth) and the
    /// anharmonic check, not by harmonic axes.
    pub particle: Option<ParticleSpec>,
    /// Name of the reference axis (the one the ramp is drawn for).
    pub reference_name: String,
    /// Well shape of the reference axis.
    pub reference_well: WellSpec,
    /// Further axes the same control moves.
    pub axes: Vec<AxisSpec>,
}

impl Default for TrapModelSpec {
    fn default() -> Self {
        Self {
            particle: None,
            reference_name: "reference".into(),
            reference_well: WellSpec::Harmonic,
            axes: Vec::new(),
        }
    }
}

/// The trapped particle, by mass or by a common species.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum ParticleSpec {
    /// Mass in unified atomic mass units (u = m(12C)/12).
    MassU(f64),
    /// Mass in kg.
    MassKg(f64),
    /// A common species by name (a convenience; see [`crate::species`]).
    Species(String),
}

/// One further axis of the trap: omega_axis² = gain omega² + sign(F) (2 pi F)², with
/// omega the reference axis's and F = `offset_hz`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct AxisSpec {
    /// Its name ("axial", "y").
    pub name: String,
    /// Gain on the reference omega² (not 0; negative for an axis pushed the other way,
    /// like a Paul trap's radial axes under its DC voltage).
    pub gain: f64,
    /// Offset as a signed frequency F, Hz: adds sign(F) (2 pi F)² to omega_axis².
    pub offset_hz: f64,
    /// Lowest frequency this axis may reach, Hz.
    pub lowest_frequency_hz: Option<f64>,
    /// Highest frequency this axis may reach, Hz.
    pub highest_frequency_hz: Option<f64>,
    /// Its well shape.
    pub well: WellSpec,
}

impl Default for AxisSpec {
    fn default() -> Self {
        Self {
            name: "axis".into(),
            gain: 1.0,
            offset_hz: 0.0,
            lowest_frequency_hz: None,
            highest_frequency_hz: None,
            well: WellSpec::Harmonic,
        }
    }
}

/// The shape of an axis's well along a line through the trap centre. Every shape has
/// curvature m omega_axis² at its bottom.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum WellSpec {
    /// V = m omega² x²/2 (may invert).
    Harmonic,
    /// A Gaussian beam's radial profile, V = U (1 - exp(-2x²/w0²)), U = m omega² w0²/4.
    Gaussian {
        /// Beam waist w0 (1/e² intensity radius), m.
        waist_m: f64,
    },
    /// A focused beam's axial profile, V = U (1 - 1/(1 + x²/zR²)), U = m omega² zR²/2.
    Lorentzian {
        /// Rayleigh range zR, m.
        rayleigh_range_m: f64,
    },
    /// An optical tweezer: this axis is its radial one (Gaussian of waist w0), and an
    /// axial axis (Lorentzian of Rayleigh range zR) is added with omega_z² =
    /// (w0²/(2 zR²)) omega_r². zR comes from the wavelength (paraxial beam, zR = pi
    /// w0²/lambda) or from a measured axial/radial frequency ratio r (zR = w0/(r sqrt 2)).
    Tweezer {
        /// Beam waist w0, m.
        waist_m: f64,
        /// How the axial axis is sized.
        axial: TweezerAxialSpec,
        /// Name of the added axial axis.
        axial_name: String,
    },
}

/// How a tweezer's axial axis is sized.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub enum TweezerAxialSpec {
    /// From the trapping light's wavelength, m (paraxial Gaussian beam).
    Wavelength(f64),
    /// From a measured ratio nu_axial / nu_radial (> 0, < 1 for a real tweezer).
    FrequencyRatio(f64),
}

/// The initial state.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum InitialStateSpec {
    /// Thermal with mean occupation n (>= 0; 0 is the ground state).
    Thermal {
        /// Mean occupation.
        occupation: f64,
    },
    /// Thermal at a temperature, K (>= 0).
    ThermalAt {
        /// Temperature, K.
        temperature_k: f64,
    },
    /// A squeezed thermal state: occupation n, squeezing r, angle phi (rad).
    Squeezed {
        /// Mean occupation of the unsqueezed state.
        occupation: f64,
        /// Squeezing parameter r (|r| <= 20).
        r: f64,
        /// Squeezing angle, rad.
        phi: f64,
    },
    /// General Gaussian state by its moments in units of the start trap:
    /// X omega_i/hbar, Y/(hbar omega_i), D/hbar.
    Moments {
        /// X omega_i / hbar.
        x_scaled: f64,
        /// Y / (hbar omega_i).
        y_scaled: f64,
        /// D / hbar.
        d_scaled: f64,
    },
}

/// Noise during ramps.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize, Default)]
#[serde(default)]
pub struct NoiseSpec {
    /// Dephasing rate, 1/s (>= 0).
    pub dephasing_rate_per_s: f64,
    /// Two-sided spectral density of fractional omega² noise, s (>= 0).
    pub amplitude_psd_s: f64,
}

/// A named candidate ramp.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CandidateRamp {
    /// Unique name in the study.
    pub name: String,
    /// Shown on the plots.
    #[serde(default = "yes")]
    pub visible: bool,
    /// Plot colour, sRGB.
    #[serde(default)]
    pub colour: Option<[u8; 3]>,
    /// The shape.
    pub ramp: RampSpec,
}

fn yes() -> bool {
    true
}

/// A ramp shape in file units.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum RampSpec {
    /// omega linear in time.
    Linear {
        /// Start frequency, Hz.
        from_hz: f64,
        /// End frequency, Hz.
        to_hz: f64,
        /// Duration, s.
        duration_s: f64,
    },
    /// Constant adiabatic parameter mu (set by the duration).
    ConstantMu {
        /// Start frequency, Hz.
        from_hz: f64,
        /// End frequency, Hz.
        to_hz: f64,
        /// Duration, s.
        duration_s: f64,
    },
    /// Invariant-based shortcut polynomial (Chen et al. 2010).
    Shortcut {
        /// Start frequency, Hz.
        from_hz: f64,
        /// End frequency, Hz.
        to_hz: f64,
        /// Duration, s.
        duration_s: f64,
    },
    /// omega² = sum a_k (t/tau)^k.
    Polynomial {
        /// Coefficients a_k, (rad/s)².
        omega2_coefficients: Vec<f64>,
        /// Duration, s.
        duration_s: f64,
    },
    /// Piecewise-constant holds.
    Holds {
        /// Start frequency, Hz.
        from_hz: f64,
        /// End frequency, Hz.
        to_hz: f64,
        /// The holds, in order.
        holds: Vec<HoldSpec>,
    },
    /// Spline through knots.
    Spline {
        /// Knots (t, nu); the first at t = 0.
        knots: Vec<KnotSpec>,
        /// Interpolation shape.
        #[serde(default)]
        shape: SplineShapeSpec,
        /// Interpolate nu or ln nu.
        #[serde(default)]
        log_frequency: bool,
        /// Zero slope at both ends.
        #[serde(default)]
        flat_ends: bool,
    },
    /// A sampled table (an imported waveform), embedded so the study is self-contained.
    Waveform {
        /// Where it came from (informational).
        #[serde(default)]
        source: String,
        /// Value column holds omega² (true) or omega (false).
        #[serde(default)]
        omega2_column: bool,
        /// Left sample-and-hold (true) or linear interpolation (false).
        #[serde(default)]
        hold: bool,
        /// Row times, s.
        times_s: Vec<f64>,
        /// Row values, rad/s or (rad/s)².
        values: Vec<f64>,
        /// The trap before and after the table, rad/s, when the file stated them (a
        /// played table starts on its first sample, not on the trap before it).
        #[serde(default)]
        end_frequencies_rad_s: Option<(f64, f64)>,
    },
}

impl RampSpec {
    /// A short name of the family, for lists.
    pub fn family_label(&self) -> &'static str {
        match self {
            Self::Linear { .. } => "linear",
            Self::ConstantMu { .. } => "constant mu",
            Self::Shortcut { .. } => "shortcut",
            Self::Polynomial { .. } => "polynomial",
            Self::Holds { .. } => "holds",
            Self::Spline { .. } => "spline",
            Self::Waveform { .. } => "waveform",
        }
    }
}

/// One hold: a signed frequency (negative means an inverted trap, omega² = -(2 pi nu)²)
/// for a duration.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct HoldSpec {
    /// Signed ordinary frequency, Hz.
    pub signed_frequency_hz: f64,
    /// Duration, s.
    pub duration_s: f64,
}

/// A spline knot.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct KnotSpec {
    /// Time, s.
    pub t_s: f64,
    /// Frequency, Hz.
    pub frequency_hz: f64,
}

/// Spline shape in files.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
pub enum SplineShapeSpec {
    /// Shape-preserving (PCHIP).
    #[default]
    Monotone,
    /// C2 cubic.
    Smooth,
}

/// A bath's filling: occupation at its frequency, or temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub enum BathFilling {
    /// Mean occupation at the bath's frequency.
    Occupation(f64),
    /// Temperature, K.
    TemperatureK(f64),
}

/// One bath stroke.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct BathSpec {
    /// Trap frequency during contact, Hz.
    pub frequency_hz: f64,
    /// Bath occupation or temperature.
    pub filling: BathFilling,
    /// Coupling Gamma, 1/s.
    pub rate_per_s: f64,
    /// Contact time, s.
    pub time_s: f64,
}

/// A work stroke of the cycle.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum StrokeSpec {
    /// A candidate of the study, by name.
    Candidate(String),
    /// Sudden jump then a hold of this many seconds.
    Sudden {
        /// Hold, s.
        hold_s: f64,
    },
    /// Ideal adiabatic scaling taking this time.
    IdealAdiabatic {
        /// Duration, s.
        time_s: f64,
    },
    /// A ramp given in place.
    Ramp(RampSpec),
}

/// The Otto cycle.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CycleSpec {
    /// Hot bath (higher frequency).
    pub hot: BathSpec,
    /// Cold bath.
    pub cold: BathSpec,
    /// Expansion hot -> cold.
    pub expansion: StrokeSpec,
    /// Compression cold -> hot.
    pub compression: StrokeSpec,
}

/// The waveform generator and the drive chain from its output to the trap.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct GeneratorSpec {
    /// Sample rate, samples/s (> 0).
    pub sample_rate_per_s: f64,
    /// Take each sample at the middle of its period (else at its start).
    pub midpoint_samples: bool,
    /// DAC resolution, bits (1 to 32); quantises only with `drive` (its full scale).
    pub bits: Option<u32>,
    /// What the drive is and how it maps to the trap frequency.
    pub drive: Option<DriveSpec>,
    /// Largest |d drive/dt| of the output stage, drive units per s (> 0).
    pub slew_limit_per_s: Option<f64>,
    /// Time constant of a first-order low-pass in the drive chain, s (> 0).
    pub low_pass_s: Option<f64>,
    /// rms clock jitter of the sample edges, s (>= 0, at most an eighth of a period).
    pub jitter_rms_s: Option<f64>,
    /// Highest rate the smallest-rate search starts from, samples/s (>= the rate);
    /// `None`: the rate played.
    pub max_rate_per_s: Option<f64>,
}

impl Default for GeneratorSpec {
    fn default() -> Self {
        Self {
            sample_rate_per_s: 1e8,
            midpoint_samples: false,
            bits: None,
            drive: None,
            slew_limit_per_s: None,
            low_pass_s: None,
            jitter_rms_s: None,
            max_rate_per_s: None,
        }
    }
}

/// The drive signal: unit, calibration to the trap frequency, full-scale range.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct DriveSpec {
    /// Name of the drive unit for files and plots (e.g. "V", "mW").
    pub unit: String,
    /// How drive maps to frequency.
    pub calibration: DriveCalibrationSpec,
    /// Drive at the lowest DAC code.
    pub full_scale_low: f64,
    /// Drive at the highest DAC code (> full_scale_low).
    pub full_scale_high: f64,
    /// Whether the drive can go negative (false for an optical trap's power).
    pub can_go_negative: bool,
}

impl Default for DriveSpec {
    fn default() -> Self {
        Self {
            unit: "V".into(),
            calibration: DriveCalibrationSpec::default(),
            full_scale_low: 0.0,
            full_scale_high: 10.0,
            can_go_negative: false,
        }
    }
}

/// Drive against trap frequency.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum DriveCalibrationSpec {
    /// Drive proportional to nu² (optical power, electrode voltage): `drive_at_reference`
    /// at `reference_frequency_hz`.
    FrequencySquared {
        /// Reference frequency, Hz (> 0).
        reference_frequency_hz: f64,
        /// Drive there (non-zero).
        drive_at_reference: f64,
    },
    /// A measured table, read linearly: frequencies (Hz, rising) and drives (monotone).
    Table {
        /// Frequencies, Hz.
        frequency_hz: Vec<f64>,
        /// Drives, drive units.
        drive: Vec<f64>,
    },
}

impl Default for DriveCalibrationSpec {
    fn default() -> Self {
        Self::FrequencySquared { reference_frequency_hz: 100e3, drive_at_reference: 1.0 }
    }
}
