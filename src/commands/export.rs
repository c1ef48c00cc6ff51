//! `quenchless export`: the trap as the study's generator plays a candidate.

use super::playing::{Source, judge};
use super::propagation;
use crate::CommandError;
use crate::cli::{Columns, ExportArgs};
use quenchless_physics::playback::{AssessmentSettings, Playback};
use quenchless_profile::{ExportColumns, convert, load_study};

pub fn run(a: &ExportArgs) -> Result<(), CommandError> {
    if let Some(r) = a.rate
        && !(r.is_finite() && r > 0.0)
    {
        return Err(CommandError(format!("--rate {r}: allowed a finite number of samples per second > 0")));
    }
    let study = load_study(&a.profile)?;
    let (_, ramp) = convert::named_candidate(&study, &a.ramp, "--ramp").map_err(|e| e.in_file(&a.profile))?;
    let (base, unit, max_rate) = match &study.generator {
        Some(g) => (
            Some(convert::playback(g).map_err(|e| e.in_file(&a.profile))?),
            g.drive.as_ref().map_or_else(|| "rad^2/s^2".to_string(), |d| d.unit.clone()),
            g.max_rate_per_s,
        ),
        None => (None, "rad^2/s^2".to_string(), None),
    };
    let playback = match (a.rate, base) {
        (Some(r), Some(b)) => Playback { rate: r, ..b },
        (Some(r), None) => Playback::sample_and_hold(r),
        (None, Some(b)) => b,
        (None, None) => {
            return Err(CommandError(
                "give --rate R (samples per second): the study has no generator section stating one".into(),
            ));
        }
    };
    let limits = convert::limits(&study.trap).map_err(|e| e.in_file(&a.profile))?;
    let settings =
        AssessmentSettings { tolerance: study.tolerance, limits, max_rate, searches: false, ..Default::default() };
    let source = Source { study: Some(&study.name), candidate: &a.ramp, ramp: &ramp, limits };
    let judged = judge(source, playback, unit, settings, &propagation(None)?)?;
    judged.announce();
    let columns = match a.columns {
        Columns::Si => ExportColumns::Si,
        Columns::Lab => ExportColumns::LabMicrosecondsKilohertz,
        Columns::Omega2 => ExportColumns::Omega2,
    };
    let rows = judged.write_trap(&a.out, columns)?;
    eprintln!("wrote {rows} rows to {}", a.out.display());
    Ok(())
}
