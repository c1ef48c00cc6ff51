//! `quenchless export`.

use crate::CommandError;
use crate::cli::{Columns, ExportArgs};
use quenchless_physics::{EvaluationSettings, RampShape, evaluate};
use quenchless_profile::{ExportColumns, convert, load_study, write_waveform};

/// Shown before every export from the command line.
pub const CAUTION: &str = "CAUTION: this waveform drives real apparatus (high-voltage trap electrodes, high-power lasers). \
Check it against the apparatus limits and interlocks and follow local laser and electrical safety rules and your lab's licensed practice before playing it.";

pub fn run(a: &ExportArgs) -> Result<(), CommandError> {
    if !(a.rate.is_finite() && a.rate > 0.0) {
        return Err(CommandError(format!("--rate {}: allowed a finite number of samples per second > 0", a.rate)));
    }
    let study = load_study(&a.profile)?;
    let (i, ramp) = convert::named_candidate(&study, &a.ramp, "--ramp").map_err(|e| e.in_file(&a.profile))?;
    let c = &study.candidates[i];
    let settings = EvaluationSettings {
        tolerance: study.tolerance,
        samples: 201,
        limits: convert::limits(&study.trap)?,
        ..EvaluationSettings::default()
    };
    let initial = convert::initial_state(&study.initial_state, ramp.omega_initial())?;
    let rep = evaluate(&ramp, &initial, &settings)?.report;
    eprintln!("{CAUTION}");
    let mut provenance = vec![
        format!("written by quenchless {}", env!("CARGO_PKG_VERSION")),
        format!("study: {}", study.name),
        format!(
            "ramp: {} ({}), duration {:e} s, sampled at {:e} samples/s",
            c.name,
            ramp.family_name(),
            ramp.duration(),
            a.rate
        ),
        format!(
            "designed Q* = {:.12} ({} at tolerance {:e}), min omega^2 = {:e} (rad/s)^2",
            rep.q_star,
            if rep.energy_diagonal { "energy-diagonal" } else { "NOT energy-diagonal" },
            rep.tolerance,
            rep.min_omega2
        ),
    ];
    if rep.violations.is_empty() {
        provenance.push("limits: none broken (stated bounds and slew checked)".into());
    }
    for v in &rep.violations {
        let line =
            format!("WARNING: {} from {:e} s to {:e} s (worst {:e})", v.kind.describe(), v.start, v.end, v.worst);
        eprintln!("{line}");
        provenance.push(line);
    }
    provenance.push("CAUTION: drives high-voltage / high-power laser hardware; check against apparatus limits and local safety rules".into());
    let columns = match a.columns {
        Columns::Si => ExportColumns::Si,
        Columns::Lab => ExportColumns::LabMicrosecondsKilohertz,
        Columns::Omega2 => ExportColumns::Omega2,
    };
    let rows = write_waveform(&a.out, &ramp, a.rate, columns, &provenance)?;
    eprintln!("wrote {} rows to {}", rows, a.out.display());
    Ok(())
}
