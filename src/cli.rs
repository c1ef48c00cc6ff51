//! Command-line arguments. Quantities with units are a number followed by a
//! case-sensitive unit, with or without a space: frequency (ordinary frequency
//! nu = omega/2 pi) Hz, kHz, MHz, GHz; time s, ms, us (or µs), ns; temperature K, mK,
//! uK (or µK), nK; sample rate S/s, kS/s, MS/s, GS/s or Hz..GHz (or a bare number of
//! samples per second). They are read by the value parsers of [`crate::flags`] and
//! arrive in SI. Bath couplings and dephasing rates are bare numbers per second.

use crate::flags::{self, Given};
use clap::{Args, Parser, Subcommand, ValueEnum};
use std::path::PathBuf;

/// Design, verify and export trap-frequency ramps for a quantum harmonic oscillator.
/// Without a subcommand the desktop app opens on its built-in scenario.
#[derive(Debug, Parser)]
#[command(name = "quenchless", version, about, long_about = None)]
pub struct Cli {
    /// What to do; none opens the desktop app.
    #[command(subcommand)]
    pub command: Option<Command>,
}

/// Subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Open a study profile (.ron) in the desktop app.
    Open {
        /// The profile.
        file: PathBuf,
    },
    /// Evaluate a waveform file or a profile's candidate ramps: Q*, coherence, work,
    /// friction work, Casimir drift, min omega², peak energy, energy-diagonal verdict.
    Eval(EvalArgs),
    /// Analyse an Otto cycle (from a profile, or from flags): stability, limit cycle,
    /// work, heats, efficiency or COP, power, corner states.
    Cycle(Box<CycleArgs>),
    /// Write a profile's candidate ramp as a CSV waveform sampled at a given rate.
    Export(ExportArgs),
    /// Synthesise a frictionless ramp: constant mu of order k, the shortcut polynomial,
    /// or time-optimal holds between bounds.
    Design(DesignArgs),
    /// Robustness map of a waveform over calibration and duration errors.
    Sweep(SweepArgs),
    /// Play a ramp as a waveform generator would (sample and hold at a rate, optional
    /// quantisation and low-pass of a drive proportional to omega²): Q* as designed versus
    /// as played, and the smallest rate (and bit depth) that keep Q* - 1 within tolerance.
    Play(PlayArgs),
    /// Optimise a profile's Otto cycle: the split of the cycle time between the four
    /// strokes that maximises power (at the cycle's total time, or with the total free),
    /// optionally omega_c/omega_h too, for one ramp family of the work strokes within the
    /// trap's limits.
    TuneCycle(TuneCycleArgs),
    /// The anharmonic check: propagate the start state as a wavefunction through a ramp
    /// in a real well (Gaussian, Lorentzian, or harmonic to check the solver), one axis
    /// at a time, and report the excess energy, ground-state fidelity and loss beside the
    /// harmonic figures.
    TrapCheck(Box<TrapCheckArgs>),
    /// Energy ratio of a ramp over noise strengths (dephasing rate x amplitude-noise
    /// spectral density): a CSV map and optional plot.
    SweepNoise(SweepNoiseArgs),
}

/// Ramp family of `tune-cycle`.
#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum FamilyArg {
    /// omega linear in time.
    Linear,
    /// Constant adiabatic parameter.
    ConstantMu,
    /// Invariant-based shortcut polynomial.
    Shortcut,
    /// Ideal adiabatic strokes (quasi-static limit) taking the given time; needs
    /// --min-stroke-time, since shorter strokes only raise the power (`ideal` is an alias).
    #[value(name = "adiabatic", alias = "ideal")]
    Adiabatic,
}

/// Arguments of `tune-cycle`.
#[derive(Debug, Args)]
#[expect(clippy::struct_excessive_bools, reason = "command-line switches")]
pub struct TuneCycleArgs {
    /// A study profile with a cycle section (its baths, times and trap limits).
    pub profile: PathBuf,
    /// Ramp family of both work strokes.
    #[arg(long, value_enum, default_value = "shortcut")]
    pub family: FamilyArg,
    /// Keep the total cycle time at this (a time > 0, e.g. 40us; default: the profile
    /// cycle's total).
    #[arg(long, value_name = "t", allow_hyphen_values = true, conflicts_with = "free_total", value_parser = flags::duration)]
    pub total: Option<Given>,
    /// Optimise the total cycle time too.
    #[arg(long)]
    pub free_total: bool,
    /// Also optimise omega_c/omega_h (omega_h and the bath temperatures stay).
    #[arg(long)]
    pub vary_ratio: bool,
    /// Ignore the profile's trap limits.
    #[arg(long)]
    pub ignore_limits: bool,
    /// Most optimiser iterations (1 to 1000000).
    #[arg(long, value_name = "N", default_value_t = 3000)]
    pub max_iterations: u64,
    /// Shortest time each work stroke may take (a time > 0, e.g. 2us; required for
    /// `adiabatic`).
    #[arg(long, value_name = "t", allow_hyphen_values = true, value_parser = flags::duration)]
    pub min_stroke_time: Option<Given>,
    /// Write the study with the optimised cycle (strokes as candidates) to this profile.
    #[arg(long, value_name = "FILE.ron")]
    pub profile_out: Option<PathBuf>,
    /// Print JSON instead of a readable report.
    #[arg(long)]
    pub json: bool,
}

/// Well shape of `trap-check`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ShapeArg {
    /// V = m omega² x²/2 (the solver's check against the exact answer).
    Harmonic,
    /// A beam's radial profile, V = U (1 - exp(-2x²/w0²)); --length is the waist w0.
    Gaussian,
    /// A beam's axial profile, V = U (1 - 1/(1 + x²/zR²)); --length is the Rayleigh range.
    Lorentzian,
}

/// The ramp a command works on: a study profile's candidate, or a CSV waveform.
#[derive(Debug, Args)]
pub struct RampSource {
    /// A study profile (with --ramp NAME).
    #[arg(conflicts_with = "waveform", requires = "ramp")]
    pub profile: Option<PathBuf>,
    /// The candidate of the profile.
    #[arg(long, value_name = "NAME")]
    pub ramp: Option<String>,
    /// Or a CSV waveform (linear reading, or --hold).
    #[arg(long, value_name = "FILE.csv")]
    pub waveform: Option<PathBuf>,
    /// Read --waveform by left sample-and-hold.
    #[arg(long, requires = "waveform")]
    pub hold: bool,
}

/// Arguments of `trap-check`.
#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
pub struct TrapCheckArgs {
    /// The ramp: a profile's candidate (without --shape, every axis of its trap model is
    /// checked) or a waveform (with --shape).
    #[command(flatten)]
    pub source: RampSource,
    /// Particle mass: 86.909180527u or 1.443e-25kg (needed by gaussian and lorentzian).
    #[arg(long, value_name = "M", value_parser = flags::mass, allow_hyphen_values = true)]
    pub mass: Option<Given>,
    /// Well shape of the one axis checked (flags mode; needed with --waveform). Without
    /// it, every axis of the profile's trap model is checked.
    #[arg(long, value_enum)]
    pub shape: Option<ShapeArg>,
    /// Waist (gaussian) or Rayleigh range (lorentzian): 800nm, 0.8um, 2.4µm, 1mm, 1e-6m.
    #[arg(long, value_name = "L", value_parser = flags::length, allow_hyphen_values = true)]
    pub length: Option<Given>,
    /// Gain of the axis on the ramp's omega² (default 1).
    #[arg(long, value_name = "A")]
    pub gain: Option<f64>,
    /// Offset of the axis as a signed frequency F (adds sign(F) (2 pi F)² to omega²): 5kHz, -2kHz.
    #[arg(long, value_name = "F", value_parser = flags::signed_frequency, allow_hyphen_values = true)]
    pub offset: Option<Given>,
    /// Mean occupation N of the start state on the axis's initial trap (0 = ground
    /// state; default the study's thermal start, else 0).
    #[arg(long, value_name = "N")]
    pub occupation: Option<f64>,
    /// Tolerance on |energy ratio - 1| (default the study's, else 1e-3).
    #[arg(long, value_name = "T")]
    pub tolerance: Option<f64>,
    /// Largest lost fraction for a PASS (default 1e-6).
    #[arg(long, value_name = "P", default_value_t = 1e-6)]
    pub loss_bound: f64,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// Arguments of `sweep-noise`.
#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
pub struct SweepNoiseArgs {
    /// The ramp: a profile's candidate (its initial state starts the ramp) or a waveform
    /// (the ground state unless --occupation).
    #[command(flatten)]
    pub source: RampSource,
    /// Thermal occupation of the start state for --waveform (default the ground state; a
    /// profile's candidate starts from the profile's initial state).
    #[arg(long, value_name = "N", requires = "waveform")]
    pub occupation: Option<f64>,
    /// Largest dephasing rate, per second: a bare number > 0 (no unit: a rate in Hz
    /// would invite a 2 pi error).
    #[arg(long, value_name = "G")]
    pub max_dephasing: f64,
    /// Largest two-sided spectral density of fractional omega² noise, s (bare number > 0).
    #[arg(long, value_name = "S")]
    pub max_amplitude_psd: f64,
    /// Points per axis, endpoints included (2 to 512).
    #[arg(long, value_name = "N", default_value_t = 32)]
    pub grid: usize,
    /// Output CSV: dephasing_rate_per_s,amplitude_psd_s,energy_ratio,energy_ratio_minus_one.
    #[arg(long, value_name = "FILE.csv")]
    pub out: PathBuf,
    /// Also draw the map (.png or .svg), with the tolerance contour.
    #[arg(long, value_name = "FILE")]
    pub plot: Option<PathBuf>,
    /// Tolerance on E/E_adiabatic - 1 for the contour (default 1e-3).
    #[arg(long, value_name = "T")]
    pub tolerance: Option<f64>,
    /// Requested relative accuracy (default 1e-10).
    #[arg(long, value_name = "A")]
    pub accuracy: Option<f64>,
}

/// Arguments of `play`.
#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
#[expect(clippy::struct_excessive_bools, reason = "command-line switches")]
pub struct PlayArgs {
    /// The designed ramp: a profile's candidate or a waveform.
    #[command(flatten)]
    pub source: RampSource,
    /// Generator sample rate: 100MS/s, or a clock frequency 100MHz (one sample per
    /// cycle), or a bare number of samples per second; default the profile's generator
    /// section.
    #[arg(long, value_name = "R", allow_hyphen_values = true, value_parser = flags::sample_rate)]
    pub rate: Option<Given>,
    /// Take each sample at the middle of its period instead of its start.
    #[arg(long)]
    pub midpoint: bool,
    /// Quantise the drive to this many bits over --full-scale, or over the profile's
    /// generator drive range.
    #[arg(long, value_name = "N")]
    pub bits: Option<u32>,
    /// Frequency at the highest drive code (> 0; drive proportional to omega²; the lowest
    /// code is omega² = 0, or -(2 pi F)² with --bipolar).
    #[arg(long, value_name = "F", allow_hyphen_values = true, value_parser = flags::frequency)]
    pub full_scale: Option<Given>,
    /// The drive can go negative (electric traps); without it (and without a profile
    /// generator that says so) omega² < 0 is refused.
    #[arg(long, conflicts_with = "unipolar")]
    pub bipolar: bool,
    /// The drive cannot go negative (an optical trap's power), whatever the profile says.
    #[arg(long)]
    pub unipolar: bool,
    /// Time constant of a first-order low-pass on the drive (a time > 0, e.g. 50ns).
    #[arg(long, value_name = "t", allow_hyphen_values = true, value_parser = flags::generator_time)]
    pub low_pass: Option<Given>,
    /// Slew limit of the output stage, drive units per second (bare number > 0; the drive
    /// is omega² in (rad/s)² unless the profile's generator states a drive).
    #[arg(long, value_name = "X")]
    pub slew: Option<f64>,
    /// rms clock jitter of the sample edges (a time, 0 to an eighth of a period).
    #[arg(long, value_name = "t", allow_hyphen_values = true, value_parser = flags::generator_time)]
    pub jitter: Option<Given>,
    /// Jitter realisations to average (1 to 10000).
    #[arg(long, value_name = "N", default_value_t = 16)]
    pub jitter_trials: usize,
    /// Seed of the first jitter realisation.
    #[arg(long, value_name = "N", default_value_t = 0)]
    pub seed: u64,
    /// A measured drive calibration table (CSV with header frequency_hz,drive), read
    /// linearly; replaces drive proportional to omega².
    #[arg(long, value_name = "FILE.csv")]
    pub calibration: Option<PathBuf>,
    /// Tolerance on Q* - 1 (default 1e-3, or the profile's).
    #[arg(long, value_name = "T")]
    pub tolerance: Option<f64>,
    /// Highest rate the smallest-rate search starts from, a sample rate like --rate
    /// (default the profile generator's maximum rate, else the rate played).
    #[arg(long, value_name = "R", allow_hyphen_values = true, value_parser = flags::sample_rate)]
    pub max_rate: Option<Given>,
    /// Ratio of neighbouring rates on the smallest-rate search grid (above 1, at most 2).
    #[arg(long, value_name = "X", default_value_t = 1.05)]
    pub grid_ratio: f64,
    /// Write the generator's samples in drive units (t_s,drive).
    #[arg(long, value_name = "FILE.csv")]
    pub drive_out: Option<PathBuf>,
    /// Write the integer DAC codes (sample,t_s,code); needs quantisation.
    #[arg(long, value_name = "FILE.csv")]
    pub codes_out: Option<PathBuf>,
    /// Write the played waveform (held, t[s],omega2[rad^2/s^2]).
    #[arg(long, value_name = "FILE.csv")]
    pub out: Option<PathBuf>,
    /// Print JSON instead of a readable report.
    #[arg(long)]
    pub json: bool,
}

/// Arguments of `design`.
#[derive(Debug, Args)]
pub struct DesignArgs {
    /// Which design.
    #[command(subcommand)]
    pub kind: DesignKind,
}

/// Where a designed ramp goes besides the report.
#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
pub struct DesignOutput {
    /// Also write the ramp as a CSV waveform (needs --rate).
    #[arg(long, value_name = "FILE.csv", requires = "rate")]
    pub waveform_out: Option<PathBuf>,
    /// Sample rate of --waveform-out: 1GS/s, 1GHz, or a bare number of samples per
    /// second.
    #[arg(long, value_name = "R", allow_hyphen_values = true, value_parser = flags::sample_rate)]
    pub rate: Option<Given>,
    /// Also write the ramp as a candidate of a new study profile.
    #[arg(long, value_name = "FILE.ron")]
    pub profile_out: Option<PathBuf>,
    /// Also draw the ramp, omega/2 pi against time, as an SVG.
    #[arg(long, value_name = "FILE.svg")]
    pub plot: Option<PathBuf>,
    /// Print JSON instead of a readable report.
    #[arg(long)]
    pub json: bool,
}

/// Start and end frequency of a designed ramp.
#[derive(Debug, Args)]
pub struct EndFrequencies {
    /// Start frequency (> 0, e.g. 100kHz).
    #[arg(long, value_name = "F", allow_hyphen_values = true, value_parser = flags::frequency)]
    pub from: Given,
    /// End frequency (> 0).
    #[arg(long, value_name = "F", allow_hyphen_values = true, value_parser = flags::frequency)]
    pub to: Given,
}

/// Design families.
#[derive(Debug, Subcommand)]
pub enum DesignKind {
    /// Constant adiabatic parameter mu that ends energy-diagonal: |mu| = 2/sqrt(1 + r²),
    /// r = 2 pi k / |ln(omega_f/omega_i)| (Rezek and Kosloff 2006).
    #[command(allow_negative_numbers = true)]
    ConstantMu {
        /// End frequencies.
        #[command(flatten)]
        ends: EndFrequencies,
        /// Order k >= 1 (turns of the coherence); longer ramps for larger k.
        #[arg(long, value_name = "K", conflicts_with = "near_time")]
        order: Option<u32>,
        /// Instead of --order: the frictionless order whose duration is nearest this time
        /// (> 0).
        #[arg(long, value_name = "t", allow_hyphen_values = true, value_parser = flags::duration)]
        near_time: Option<Given>,
        /// Outputs.
        #[command(flatten)]
        out: DesignOutput,
    },
    /// Invariant-based shortcut polynomial (Chen et al. 2010) for a duration, or the
    /// shortest one whose omega² stays at or above a floor.
    #[command(allow_negative_numbers = true)]
    Shortcut {
        /// End frequencies.
        #[command(flatten)]
        ends: EndFrequencies,
        /// Duration (> 0).
        #[arg(
            long,
            value_name = "t",
            allow_hyphen_values = true,
            required_unless_present = "min_omega2",
            conflicts_with = "min_omega2",
            value_parser = flags::duration
        )]
        time: Option<Given>,
        /// Floor of omega², (rad/s)² (a bare number; may be 0 or negative).
        #[arg(long, value_name = "X")]
        min_omega2: Option<f64>,
        /// Outputs.
        #[command(flatten)]
        out: DesignOutput,
    },
    /// Optimise a spline candidate of a profile: move its free knots (not the end knots,
    /// not the knot times) until Q* - 1 is below --target, within the trap's limits; with
    /// --robust E, minimise the worst Q* over calibration errors in [-E, +E] instead.
    Spline {
        /// The study profile.
        profile: PathBuf,
        /// The spline candidate.
        #[arg(long, value_name = "NAME")]
        ramp: String,
        /// Target Q* - 1 (0 < T < 1).
        #[arg(long, value_name = "T", default_value_t = 1e-6)]
        target: f64,
        /// Robust design over calibration errors in [-E, +E]: "5%" or "0.05" (above 0,
        /// below 50%).
        #[arg(long, value_name = "E", allow_hyphen_values = true, value_parser = flags::robust_band)]
        robust: Option<Given>,
        /// Calibration errors sampled across the band (odd, 3 to 41).
        #[arg(long, value_name = "N", default_value_t = 5, requires = "robust")]
        band_points: usize,
        /// Most optimiser iterations (1 to 1000000).
        #[arg(long, value_name = "N", default_value_t = 5000)]
        max_iterations: u64,
        /// Ignore the profile's trap limits.
        #[arg(long)]
        ignore_limits: bool,
        /// Bring down the reference axis's Q* alone, even when the study's trap model has
        /// other axes (by default the worst axis's Q* is the target).
        #[arg(long)]
        reference_axis_only: bool,
        /// Outputs (--profile-out writes the input study with the optimised candidate added).
        #[command(flatten)]
        out: DesignOutput,
    },
    /// Time-optimal piecewise-constant ramp with omega between --min and --max.
    #[command(allow_negative_numbers = true)]
    BangBang {
        /// End frequencies.
        #[command(flatten)]
        ends: EndFrequencies,
        /// Lowest allowed frequency (>= 0, at most the lower end frequency).
        #[arg(long, value_name = "F", allow_hyphen_values = true, value_parser = flags::frequency_or_zero)]
        min: Given,
        /// Highest allowed frequency (at least the higher end frequency).
        #[arg(long, value_name = "F", allow_hyphen_values = true, value_parser = flags::frequency)]
        max: Given,
        /// Outputs.
        #[command(flatten)]
        out: DesignOutput,
    },
}

/// Arguments of `sweep`.
#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
pub struct SweepArgs {
    /// The waveform (as played: linear reading, or --hold).
    #[arg(long, value_name = "FILE.csv")]
    pub waveform: PathBuf,
    /// Read the waveform by left sample-and-hold.
    #[arg(long)]
    pub hold: bool,
    /// Largest calibration error e (every omega scaled by 1 + e): "5%" or "0.05" (0 to
    /// below 90%).
    #[arg(long, value_name = "E", default_value = "5%", allow_hyphen_values = true, value_parser = flags::map_error)]
    pub calibration_error: Given,
    /// Largest duration error d (duration scaled by 1 + d): "5%" or "0.05" (0 to below
    /// 90%).
    #[arg(long, value_name = "D", default_value = "5%", allow_hyphen_values = true, value_parser = flags::map_error)]
    pub duration_error: Given,
    /// Points per axis, endpoints included (2 to 2048).
    #[arg(long, value_name = "N", default_value_t = 128)]
    pub grid: usize,
    /// Output CSV: calibration_error,duration_error,q_star,final_coherence_ratio.
    #[arg(long, value_name = "FILE.csv")]
    pub out: PathBuf,
    /// Also draw the map (.png or .svg), with the tolerance contour.
    #[arg(long, value_name = "FILE")]
    pub plot: Option<PathBuf>,
    /// Tolerance on Q* - 1 for the contour and the summary (default 1e-3).
    #[arg(long, value_name = "T")]
    pub tolerance: Option<f64>,
    /// Requested relative accuracy (default 1e-10).
    #[arg(long, value_name = "A")]
    pub accuracy: Option<f64>,
}

/// Arguments of `eval`.
#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
pub struct EvalArgs {
    /// A study profile (.ron); evaluates its candidates.
    #[arg(conflicts_with = "waveform")]
    pub profile: Option<PathBuf>,
    /// A CSV waveform to evaluate (header t,omega or t,omega2 or with units).
    #[arg(long, value_name = "FILE.csv")]
    pub waveform: Option<PathBuf>,
    /// Read the waveform by left sample-and-hold (row k held on [t_k, t_k+1)) instead of
    /// linear interpolation.
    #[arg(long, requires = "waveform")]
    pub hold: bool,
    /// Mean occupation of the thermal start (>= 0; 0 = ground state). Waveforms only.
    #[arg(long, value_name = "N0", requires = "waveform")]
    pub occupation: Option<f64>,
    /// Tolerance on Q* - 1 for the energy-diagonal verdict (default 1e-3, or the profile's).
    #[arg(long, value_name = "T", allow_hyphen_values = true)]
    pub tolerance: Option<f64>,
    /// Requested relative accuracy of Q* for smooth ramps (default 1e-10).
    #[arg(long, value_name = "A")]
    pub accuracy: Option<f64>,
    /// Only this candidate of the profile.
    #[arg(long, value_name = "NAME", requires = "profile")]
    pub ramp: Option<String>,
    /// Print JSON instead of a readable report.
    #[arg(long)]
    pub json: bool,
}

/// Kinds of work stroke for `cycle` from flags.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum StrokeKind {
    /// omega linear in time.
    Linear,
    /// Sudden jump, then a hold for the stroke time (default 0).
    Sudden,
    /// Ideal adiabatic scaling (Q* = 1) taking the stroke time.
    Adiabatic,
    /// Invariant-based shortcut polynomial (frictionless).
    Shortcut,
    /// Constant adiabatic parameter mu.
    ConstantMu,
}

impl StrokeKind {
    /// The value as typed on the command line.
    pub fn name(self) -> &'static str {
        match self {
            Self::Linear => "linear",
            Self::Sudden => "sudden",
            Self::Adiabatic => "adiabatic",
            Self::Shortcut => "shortcut",
            Self::ConstantMu => "constant-mu",
        }
    }
}

/// Arguments of `cycle`.
#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
pub struct CycleArgs {
    /// A study profile with a cycle; if given, the flags below are not used.
    pub profile: Option<PathBuf>,
    /// Hot-stroke trap frequency (> 0, e.g. 200kHz).
    #[arg(long, value_name = "F", allow_hyphen_values = true, value_parser = flags::frequency)]
    pub hot_freq: Option<Given>,
    /// Cold-stroke trap frequency (> 0, below the hot one).
    #[arg(long, value_name = "F", allow_hyphen_values = true, value_parser = flags::frequency)]
    pub cold_freq: Option<Given>,
    /// Hot bath mean occupation at the hot frequency.
    #[arg(long, value_name = "N", conflicts_with = "hot_temp")]
    pub hot_occupation: Option<f64>,
    /// Hot bath temperature (>= 0, e.g. 20uK).
    #[arg(long, value_name = "T", allow_hyphen_values = true, value_parser = flags::temperature)]
    pub hot_temp: Option<Given>,
    /// Cold bath mean occupation at the cold frequency.
    #[arg(long, value_name = "N", conflicts_with = "cold_temp")]
    pub cold_occupation: Option<f64>,
    /// Cold bath temperature (>= 0).
    #[arg(long, value_name = "T", allow_hyphen_values = true, value_parser = flags::temperature)]
    pub cold_temp: Option<Given>,
    /// Hot bath coupling Gamma, per second: a bare number >= 0 (no unit: a rate in Hz
    /// would invite a 2 pi error).
    #[arg(long, value_name = "G")]
    pub hot_rate: Option<f64>,
    /// Cold bath coupling Gamma, per second: a bare number >= 0 (no unit, as --hot-rate).
    #[arg(long, value_name = "G")]
    pub cold_rate: Option<f64>,
    /// Hot contact time (>= 0).
    #[arg(long, value_name = "t", allow_hyphen_values = true, value_parser = flags::time_or_zero)]
    pub hot_time: Option<Given>,
    /// Cold contact time (>= 0).
    #[arg(long, value_name = "t", allow_hyphen_values = true, value_parser = flags::time_or_zero)]
    pub cold_time: Option<Given>,
    /// Expansion stroke kind.
    #[arg(long, value_name = "KIND", conflicts_with = "expand_waveform")]
    pub expand: Option<StrokeKind>,
    /// Expansion stroke time (>= 0; > 0 for a ramp).
    #[arg(long, value_name = "t", allow_hyphen_values = true, value_parser = flags::time_or_zero)]
    pub expand_time: Option<Given>,
    /// Expansion as a waveform file (its end frequencies must match to 1e-6).
    #[arg(long, value_name = "FILE.csv")]
    pub expand_waveform: Option<PathBuf>,
    /// Compression stroke kind.
    #[arg(long, value_name = "KIND", conflicts_with = "compress_waveform")]
    pub compress: Option<StrokeKind>,
    /// Compression stroke time (>= 0; > 0 for a ramp).
    #[arg(long, value_name = "t", allow_hyphen_values = true, value_parser = flags::time_or_zero)]
    pub compress_time: Option<Given>,
    /// Compression as a waveform file.
    #[arg(long, value_name = "FILE.csv")]
    pub compress_waveform: Option<PathBuf>,
    /// Read both waveform files by left sample-and-hold.
    #[arg(long)]
    pub hold: bool,
    /// Requested relative accuracy for smooth ramps (default 1e-10).
    #[arg(long, value_name = "A")]
    pub accuracy: Option<f64>,
    /// Print JSON instead of a readable report.
    #[arg(long)]
    pub json: bool,
}

/// Column layout of an exported waveform.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum, Default)]
pub enum Columns {
    /// t[s],omega[rad/s] (omega2 when the ramp inverts the trap).
    #[default]
    Si,
    /// t[us],nu[kHz].
    Lab,
    /// t[s],omega2[rad^2/s^2].
    Omega2,
}

/// Arguments of `export`.
#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
pub struct ExportArgs {
    /// The study profile.
    pub profile: PathBuf,
    /// Name of the candidate ramp.
    #[arg(long, value_name = "NAME")]
    pub ramp: String,
    /// Sample rate: 100MS/s, or a clock frequency 100MHz (one sample per cycle), or a
    /// bare number of samples per second (e.g. 1e8); default the study's generator
    /// section.
    #[arg(long, value_name = "R", allow_hyphen_values = true, value_parser = flags::sample_rate)]
    pub rate: Option<Given>,
    /// Output CSV file (written atomically).
    #[arg(long, value_name = "FILE.csv")]
    pub out: PathBuf,
    /// Column layout.
    #[arg(long, value_enum, default_value_t = Columns::Si)]
    pub columns: Columns,
}
