//! The headless commands.

mod cycle;
mod design;
mod eval;
pub(crate) mod export;
mod generator;
mod play;
mod playing;
mod sweep;
mod sweep_noise;
mod trap_check;
mod tune_cycle;

use crate::CommandError;
use crate::cli::{Cli, Command};
use quenchless_physics::PropagationOptions;

/// Runs the parsed command line.
pub fn dispatch(cli: Cli) -> Result<(), CommandError> {
    match cli.command {
        None => quenchless_app::run_app(None).map_err(CommandError),
        Some(Command::Open { file }) => {
            // Fail early with a clear message rather than opening a window on nothing.
            if !file.exists() {
                return Err(CommandError(format!("{}: no such file", file.display())));
            }
            quenchless_app::run_app(Some(file)).map_err(CommandError)
        }
        Some(Command::Eval(a)) => eval::run(&a),
        Some(Command::Cycle(a)) => cycle::run(&a),
        Some(Command::Export(a)) => export::run(&a),
        Some(Command::Design(a)) => design::run(&a.kind),
        Some(Command::Sweep(a)) => sweep::run(&a),
        Some(Command::Play(a)) => play::run(&a),
        Some(Command::TuneCycle(a)) => tune_cycle::run(&a),
        Some(Command::SweepNoise(a)) => sweep_noise::run(&a),
        Some(Command::TrapCheck(a)) => trap_check::run(&a),
    }
}

/// The ramp a command was given, read and converted.
pub(crate) enum GivenRamp {
    /// A CSV waveform.
    Waveform {
        /// The table as read (linear, or held with --hold).
        ramp: quenchless_physics::ramp::Ramp,
        /// The file.
        path: std::path::PathBuf,
    },
    /// A candidate of a study profile.
    Candidate {
        /// The candidate's ramp.
        ramp: quenchless_physics::ramp::Ramp,
        /// The whole study.
        study: Box<quenchless_profile::Study>,
        /// The profile.
        path: std::path::PathBuf,
        /// The candidate's name.
        name: String,
    },
}

impl GivenRamp {
    /// Reads what `source` names. `missing` completes the message when neither a
    /// profile with --ramp nor a waveform was given.
    pub(crate) fn read(source: &crate::cli::RampSource, missing: &str) -> Result<Self, CommandError> {
        use quenchless_profile::{convert, load_study, read_waveform};
        if let Some(path) = &source.waveform {
            let table = read_waveform(path)?;
            let reading = table.reading(source.hold, "--hold").map_err(|e| e.in_file(path))?;
            return Ok(Self::Waveform { ramp: table.to_ramp(reading, path)?, path: path.clone() });
        }
        let (Some(path), Some(name)) = (&source.profile, &source.ramp) else {
            return Err(CommandError(format!("give a profile with --ramp NAME, or --waveform FILE.csv{missing}")));
        };
        let study = load_study(path)?;
        let (_, ramp) = convert::named_candidate(&study, name, "--ramp").map_err(|e| e.in_file(path))?;
        Ok(Self::Candidate { ramp, study: Box::new(study), path: path.clone(), name: name.clone() })
    }

    /// A waveform's name for titles and reports: its file name without the folder or
    /// the extension (a title never holds a path).
    pub(crate) fn file_stem(path: &std::path::Path) -> String {
        path.file_stem().map_or_else(|| "the waveform".into(), |s| s.to_string_lossy().into_owned())
    }
}

/// Propagation options from an optional `--accuracy`.
pub(crate) fn propagation(accuracy: Option<f64>) -> Result<PropagationOptions, CommandError> {
    match accuracy {
        None => Ok(PropagationOptions::default()),
        Some(a) => PropagationOptions::with_accuracy(a)
            .map_err(|_| CommandError(format!("--accuracy {a}: allowed 1e-15 to 1e-2"))),
    }
}

/// Checks a `--tolerance`.
pub(crate) fn tolerance(t: Option<f64>, default: f64) -> Result<f64, CommandError> {
    match t {
        None => Ok(default),
        Some(t) if t.is_finite() && t > 0.0 && t < 1.0 => Ok(t),
        Some(t) => Err(CommandError(format!("--tolerance {t}: allowed a number in (0, 1)"))),
    }
}

/// Checks a `--plot` path: it must end in .png or .svg.
pub(crate) fn plot_path(plot: Option<&std::path::Path>) -> Result<(), CommandError> {
    if let Some(p) = plot {
        let ext = p.extension().and_then(|e| e.to_str()).unwrap_or("");
        if ext != "png" && ext != "svg" {
            return Err(CommandError(format!("--plot {}: the file must end in .png or .svg", p.display())));
        }
    }
    Ok(())
}

/// Progress of a map on stderr, every 10 % of `total` points.
pub(crate) fn map_progress(total: usize) -> impl Fn(usize) + Sync {
    let shown = std::sync::atomic::AtomicUsize::new(0);
    move |done: usize| {
        use std::sync::atomic::Ordering;
        let pct = done * 100 / total;
        if pct >= shown.load(Ordering::Relaxed) + 10 {
            shown.store(pct, Ordering::Relaxed);
            eprint!("\r{pct:3}% of {total} points");
        }
    }
}
