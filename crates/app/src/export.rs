//! Exports: CSV waveforms as the generator plays them (through the physics crate's one
//! sampling path and the profile crate's one header), and PNG crops of window
//! screenshots. Plots as figure files go through the figure layer (`quenchless-figures`).

use crate::error::{AppError, AppResult};
use quenchless_physics::playback::{AssessmentSettings, Playback, PlaybackAssessment, assess_trap};
use quenchless_physics::{PropagationOptions, RampShape};
use quenchless_profile::header::{FileContent, HeaderFacts, header_lines};
use quenchless_profile::waveform::{ExportColumns, write_trap_table};
use quenchless_profile::{Study, convert};
use std::path::Path;

/// A candidate as the study's generator plays it, judged and written with the one
/// header every file for the apparatus carries (the same path as the command line's
/// `export`). Refused when a stated limit is broken and `accept_broken_limits` is off.
pub fn export_played(
    study: &Study,
    index: usize,
    rate: f64,
    columns: ExportColumns,
    accept_broken_limits: bool,
    path: &Path,
) -> AppResult<(usize, PlaybackAssessment)> {
    let c = study.candidates.get(index).ok_or_else(|| format!("export: no candidate number {index}"))?;
    let ramp = convert::candidate_ramp(c, index).map_err(|e| AppError::from(e).during("export"))?;
    let (playback, unit, max_rate) = match &study.generator {
        Some(g) => (
            Playback { rate, ..convert::playback(g).map_err(|e| AppError::from(e).during("export"))? },
            g.drive.as_ref().map_or_else(|| "rad^2/s^2".to_string(), |d| d.unit.clone()),
            g.max_rate_per_s,
        ),
        None => (Playback::sample_and_hold(rate), "rad^2/s^2".to_string(), None),
    };
    let limits = convert::limits(&study.trap).map_err(|e| AppError::from(e).during("export"))?;
    let settings =
        AssessmentSettings { tolerance: study.tolerance, limits, max_rate, searches: false, ..Default::default() };
    let model = convert::trap_model(&study.trap).map_err(|e| AppError::from(e).during("export"))?;
    let others: Vec<_> = model.trap_axes().into_iter().skip(1).collect();
    let a = assess_trap(&ramp, &playback, &settings, &others, &PropagationOptions::default(), &|| false)
        .map_err(|e| AppError::from(e).during(format!("export: “{}” cannot be played at these settings", c.name)))?;
    if !a.within_limits() && !accept_broken_limits {
        return Err(AppError::Refused(format!(
            "export: “{}” breaks the stated limits as played; confirm to export it unchanged (it is never clipped)",
            c.name
        )));
    }
    let facts = HeaderFacts {
        study: Some(&study.name),
        candidate: &c.name,
        family: ramp.family_name(),
        playback: &playback,
        drive_unit: &unit,
        limits: &limits,
        assessment: &a,
        designed_duration_s: ramp.duration(),
        max_rate,
    };
    let trap = a.played.trap.as_ref().ok_or_else(|| AppError::from("the playing kept no table to write"))?;
    let rows = write_trap_table(path, trap, columns, &header_lines(&facts, FileContent::Trap))?;
    Ok((rows, a))
}

/// Words for a column layout.
pub fn columns_words(c: ExportColumns) -> &'static str {
    match c {
        ExportColumns::Si => "t[s], omega[rad/s] (omega² if the trap inverts)",
        ExportColumns::LabMicrosecondsKilohertz => "t[us], nu[kHz]",
        ExportColumns::Omega2 => "t[s], omega2[rad^2/s^2]",
    }
}

/// Crops a screenshot (physical pixels) to a rect in points and writes it as PNG.
pub fn save_png(
    image: &egui::ColorImage,
    crop: Option<egui::Rect>,
    pixels_per_point: f32,
    path: &Path,
) -> Result<(), String> {
    let [iw, ih] = image.size;
    let (x0, y0, x1, y1) = match crop {
        Some(r) => {
            let f = |v: f32, max: usize| ((v * pixels_per_point).round().max(0.0) as usize).min(max);
            (f(r.min.x, iw), f(r.min.y, ih), f(r.max.x, iw), f(r.max.y, ih))
        }
        None => (0, 0, iw, ih),
    };
    if x1 <= x0 || y1 <= y0 {
        return Err(format!("nothing to save: the area {x0}..{x1} × {y0}..{y1} px is empty"));
    }
    let mut buf = Vec::with_capacity((x1 - x0) * (y1 - y0) * 4);
    for y in y0..y1 {
        for x in x0..x1 {
            buf.extend_from_slice(&image.pixels[y * iw + x].to_array());
        }
    }
    image::save_buffer(path, &buf, (x1 - x0) as u32, (y1 - y0) as u32, image::ExtendedColorType::Rgba8)
        .map_err(|e| format!("{}: {e}", path.display()))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn png_crop_outside_image_is_an_error() {
        let img = egui::ColorImage::new([4, 4], vec![egui::Color32::RED; 16]);
        let dir = tempfile::tempdir().expect("temp dir");
        let p = dir.path().join("a.png");
        assert!(
            save_png(&img, Some(egui::Rect::from_min_max(egui::pos2(10.0, 10.0), egui::pos2(20.0, 20.0))), 1.0, &p)
                .is_err()
        );
        save_png(&img, Some(egui::Rect::from_min_max(egui::pos2(1.0, 1.0), egui::pos2(3.0, 3.0))), 1.0, &p)
            .expect("save");
        assert!(p.exists());
    }
}
