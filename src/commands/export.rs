//! `quenchless export`: the trap as the study's generator plays a candidate.

use super::generator;
use super::playing::{Source, judge, other_axes};
use super::propagation;
use crate::CommandError;
use crate::cli::{Columns, ExportArgs};
use quenchless_physics::playback::AssessmentSettings;
use quenchless_profile::generator_settings::{GivenSettings, SettingNames};
use quenchless_profile::{ExportColumns, convert, load_study};

pub fn run(a: &ExportArgs) -> Result<(), CommandError> {
    let study = load_study(&a.profile)?;
    let (_, ramp) = convert::named_candidate(&study, &a.ramp, "--ramp").map_err(|e| e.in_file(&a.profile))?;
    let unit = study.generator.as_ref().and_then(|g| g.drive.as_ref()).map_or("rad^2/s^2", |d| d.unit.as_str());
    let names = SettingNames {
        missing_rate: "give --rate R (samples per second): the study has no generator section stating one",
        ..generator::FLAGS
    };
    let settings = GivenSettings { rate_per_s: a.rate.as_ref().map(generator::given), ..GivenSettings::default() };
    let (playback, g) = generator::playback(&settings, study.generator.clone(), Some(&a.profile), names)?;
    let (unit, max_rate) = (unit.to_string(), g.max_rate_per_s);
    let limits = convert::limits(&study.trap).map_err(|e| e.in_file(&a.profile))?;
    let settings =
        AssessmentSettings { tolerance: study.tolerance, limits, max_rate, searches: false, ..Default::default() };
    let other_axes = other_axes(&study, &a.profile)?;
    let source = Source { study: Some(&study.name), candidate: &a.ramp, ramp: &ramp, limits, other_axes };
    let judged = judge(source, playback, unit, settings, &propagation(None)?)?;
    if a.columns == Columns::Lab && judged.assessment.inverts() {
        return Err(CommandError(
            "--columns lab: allowed si or omega2 for this ramp: the trap inverts as played (omega² <= 0), which a \
             frequency column cannot hold"
                .into(),
        ));
    }
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
