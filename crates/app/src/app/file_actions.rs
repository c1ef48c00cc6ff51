//! The app's file commands: open, save, import, export, PNG and SVG, each asking for
//! its file through the system's dialog or the built-in chooser, and what follows a
//! save that an action waited for.

use super::QuenchlessApp;
use crate::error::{AppError, AppResult};
use crate::export::{export_played, save_png};
use crate::export_dialog::ExportDialog;
use crate::file_chooser::{AfterSave, DialogChoice, FilePurpose, FileRequest, choose_dialog};
use crate::files::clear_recovery;
use crate::panels::plots::{FigureFormat, Quantity};
use crate::prompts::Prompt;
use crate::widgets::colour_of;
use egui::ViewportCommand;
use quenchless_profile::ExportColumns;
use std::path::{Path, PathBuf};

impl QuenchlessApp {
    /// Opens a study file at once (no prompt). On failure the current study stays
    /// and the error (file, line or field, what is wrong) is returned.
    pub fn open_file(&mut self, path: &Path) -> AppResult<()> {
        self.doc
            .open(path)
            .map_err(|e| AppError::from(e).during("Could not open the study; the current one is kept"))?;
        self.selected = 0;
        self.error = None;
        self.status = format!("Opened {}", path.display());
        // The caution speaks of this study's apparatus: ask again.
        self.caution_acknowledged = false;
        self.prefs.remember(path);
        Ok(())
    }

    /// Saves the study to a file (atomic); it becomes the study's file. A failed save
    /// says why and leaves the study unsaved.
    pub fn save_to(&mut self, path: &Path) -> AppResult<()> {
        self.enforce_valid();
        self.doc.save_to(path).map_err(|e| AppError::from(e).during("Not saved"))?;
        self.status = format!("Saved {}", path.display());
        self.prefs.remember(path);
        if let Some(r) = &self.recovery_path {
            clear_recovery(r);
        }
        Ok(())
    }

    /// Exports candidate i as played. Refused before the caution was acknowledged, and
    /// for a ramp that breaks stated limits unless `accept_broken_limits`.
    pub fn export_candidate(
        &mut self,
        i: usize,
        path: &Path,
        rate: f64,
        columns: ExportColumns,
        accept_broken_limits: bool,
    ) -> AppResult<usize> {
        if !self.caution_acknowledged {
            return Err(AppError::from("export: read and confirm the safety caution first"));
        }
        let study = self.doc.study();
        let name = study.candidates.get(i).map(|c| c.name.clone()).unwrap_or_default();
        let (rows, a) = export_played(study, i, rate, columns, accept_broken_limits, path)?;
        self.status =
            format!("Exported {rows} rows of “{name}” to {} (as played: {})", path.display(), a.verdict().word());
        Ok(rows)
    }

    /// Imports a CSV waveform as a new candidate; returns its index.
    pub fn import_waveform(&mut self, path: &Path) -> AppResult<usize> {
        self.enforce_valid();
        let i =
            self.doc.import_waveform(path).map_err(|e| AppError::from(e).during("Could not import the waveform"))?;
        self.selected = i;
        Ok(i)
    }

    /// A plot of every visible candidate as a figure for a talk or a paper (the one
    /// figure layer: axes, units, the legend beside the data), PNG or SVG by the
    /// extension of `path`.
    pub fn save_figure(&mut self, q: Quantity, path: &Path) -> AppResult<()> {
        self.enforce_valid();
        let study = self.doc.study();
        // A figure describes exact results: long ramps are evaluated before it is drawn.
        let results = self
            .cache
            .get_exact(study, self.doc.revision(), std::time::Duration::from_secs(3))
            .map_err(|e| AppError::from(e).during("Could not save the figure"))?;
        let mut series = Vec::new();
        let mut dashed_any = false;
        for (i, (c, r)) in study.candidates.iter().zip(&results.candidates).enumerate() {
            if let (true, Some(o)) = (c.visible, r.ready()) {
                let colour: [u8; 3] = colour_of(study, i).to_srgba_unmultiplied()[..3].try_into().unwrap_or([0, 0, 0]);
                for (curve, dashed) in q.curves(&o.series) {
                    dashed_any |= dashed && !curve.is_empty();
                    series.push(quenchless_figures::Series {
                        // One legend entry per candidate: its dashed pieces are explained once.
                        name: (!dashed).then(|| c.name.clone()),
                        colour,
                        pieces: curve.iter().map(|piece| piece.iter().map(|p| (p.x, p.y)).collect()).collect(),
                        dashed,
                    });
                }
            }
        }
        let fig = quenchless_figures::LineFigure {
            title: format!("{} — {}", q.title(), study.name),
            x_label: results.scale.x_label(),
            y_label: q.y_label(results),
            series,
            note: dashed_any.then(|| "dashed: where the trap inverts (ω² < 0), −√|ω²| is drawn".to_string()),
        };
        quenchless_figures::save_lines(&fig, path).map_err(|e| AppError::from(e.to_string()))
    }

    /// Asks for a file: the system's dialog where one can be shown, else the built-in
    /// chooser (saying once why).
    pub(super) fn request_file(&mut self, mut request: FileRequest) {
        if request.folder.is_none() {
            request.folder =
                self.doc.path().and_then(Path::parent).map(Path::to_path_buf).or_else(|| self.sandbox.clone());
        }
        match choose_dialog(self.prefs.dialogs, self.system_dialogs.as_deref()) {
            DialogChoice::System => {
                let shown = self.system_dialogs.as_ref().and_then(|d| d.show(&request));
                if let Some(path) = shown {
                    self.file_chosen(request.purpose, path, None);
                }
            }
            DialogChoice::BuiltIn(why) => {
                if let Some(why) = why
                    && !self.fallback_noted
                {
                    self.fallback_noted = true;
                    self.status = format!(
                        "Using the built-in file chooser: {why}. View > File dialogs chooses which one to use."
                    );
                }
                self.chooser.open(request, &self.prefs.recent);
            }
        }
    }

    /// Acts on a chosen file.
    pub(super) fn file_chosen(&mut self, purpose: FilePurpose, path: PathBuf, ctx: Option<&egui::Context>) {
        if let Some(root) = &self.sandbox {
            let inside = path.parent().and_then(|p| p.canonicalize().ok()).is_some_and(|p| p.starts_with(root));
            if !inside {
                self.error =
                    Some(format!("{}: outside {}, the only folder this session uses", path.display(), root.display()));
                return;
            }
        }
        match purpose {
            FilePurpose::OpenStudy => {
                if let Err(e) = self.open_file(&path) {
                    self.error = Some(e.to_string());
                }
            }
            FilePurpose::SaveStudy { then } => match self.save_to(&path) {
                Ok(()) => self.proceed(then, ctx),
                Err(e) => self.error = Some(e.to_string()),
            },
            FilePurpose::ImportWaveform => {
                if let Err(e) = self.import_waveform(&path) {
                    self.error = Some(e.to_string());
                }
            }
            FilePurpose::ExportCsv { candidate, rate, columns, accept_broken_limits } => {
                match self.export_candidate(candidate, &path, rate, columns, accept_broken_limits) {
                    Ok(_) => self.export = None,
                    Err(e) => self.error = Some(e.to_string()),
                }
            }
            // Taken next frame, once the chooser is off the screen.
            FilePurpose::Png(which) => self.png_pending = Some((which, path)),
            FilePurpose::Figure(title) => {
                let Some(q) = Quantity::ALL.iter().copied().find(|q| q.title() == title) else { return };
                match self.save_figure(q, &path) {
                    Ok(()) => self.status = format!("Saved the plot “{title}” as {}", path.display()),
                    Err(e) => self.error = Some(format!("The plot was not saved: {e}")),
                }
            }
        }
    }

    pub(super) fn ask_import(&mut self) {
        self.request_file(FileRequest {
            purpose: FilePurpose::ImportWaveform,
            title: "Import a waveform as a candidate".into(),
            save: false,
            filter_name: "waveform",
            extensions: &["csv", "txt"],
            file_name: None,
            folder: None,
        });
    }

    pub(super) fn ask_export(&mut self, d: &ExportDialog, name: &str) {
        self.request_file(FileRequest {
            purpose: FilePurpose::ExportCsv {
                candidate: d.candidate,
                rate: d.rate,
                columns: d.columns,
                accept_broken_limits: d.accept_broken_limits,
            },
            title: format!("Export “{name}” as played"),
            save: true,
            filter_name: "CSV waveform",
            extensions: &["csv"],
            file_name: Some(format!("{name}.csv")),
            folder: None,
        });
    }

    pub(super) fn ask_png(&mut self, which: Option<String>) {
        if let Some(name) = &which
            && !self.plot_rects.iter().any(|(n, _)| n == name)
        {
            self.error = Some("PNG: that plot is not on screen; open its page first".into());
            return;
        }
        let file_name = Some(format!("{}.png", which.as_deref().unwrap_or("quenchless")));
        self.request_file(FileRequest {
            purpose: FilePurpose::Png(which),
            title: "Save as PNG".into(),
            save: true,
            filter_name: "PNG image",
            extensions: &["png"],
            file_name,
            folder: None,
        });
    }

    pub(super) fn ask_figure(&mut self, q: Quantity, format: FigureFormat) {
        let ext = format.extension();
        let stem: String =
            q.title().chars().map(|c| if c.is_alphanumeric() { c.to_ascii_lowercase() } else { '-' }).collect();
        self.request_file(FileRequest {
            purpose: FilePurpose::Figure(q.title().to_string()),
            title: format!("Save the plot “{}” as {}", q.title(), ext.to_uppercase()),
            save: true,
            filter_name: if format == FigureFormat::Png { "PNG image" } else { "SVG image" },
            extensions: if format == FigureFormat::Png { &["png"] } else { &["svg"] },
            file_name: Some(format!("{}.{ext}", stem.trim_matches('-'))),
            folder: None,
        });
    }

    /// Takes a pending PNG (the window, or the crop of a plot drawn this frame).
    pub(super) fn take_png(&mut self, ctx: &egui::Context) {
        let Some((which, path)) = self.png_pending.take() else { return };
        let crop = which.as_ref().map(|name| self.plot_rects.iter().find(|(n, _)| n == name).map(|(_, r)| *r));
        let crop = match crop {
            Some(None) => {
                self.error = Some("PNG not saved: that plot is no longer on screen".into());
                return;
            }
            Some(Some(r)) => Some(r),
            None => None,
        };
        let tx = self.png_tx.clone();
        let ppp = ctx.pixels_per_point();
        let ctx2 = ctx.clone();
        ctx.send_viewport_cmd(ViewportCommand::Screenshot(egui::ScreenshotCallback::new(move |img| {
            let _ = tx.send(save_png(&img, crop, ppp, &path).map(|()| path));
            ctx2.request_repaint();
        })));
    }

    /// Goes on with `then` now, or asks first when there are unsaved changes.
    pub(super) fn guard(&mut self, then: AfterSave, ctx: &egui::Context) {
        if self.is_dirty() {
            self.prompt = Some(Prompt::Unsaved(then));
        } else {
            self.proceed(then, Some(ctx));
        }
    }

    pub(super) fn proceed(&mut self, then: AfterSave, ctx: Option<&egui::Context>) {
        match then {
            AfterSave::New => {
                self.doc.new_study();
                self.selected = 0;
                self.status = "New study".into();
            }
            AfterSave::Open(Some(p)) => {
                if let Err(e) = self.open_file(&p) {
                    self.error = Some(e.to_string());
                }
            }
            AfterSave::Open(None) => self.request_file(FileRequest {
                purpose: FilePurpose::OpenStudy,
                title: "Open a study".into(),
                save: false,
                filter_name: "Quenchless study",
                extensions: &["ron"],
                file_name: None,
                folder: None,
            }),
            AfterSave::Nothing => {}
            AfterSave::Quit => {
                if let Some(r) = &self.recovery_path {
                    clear_recovery(r);
                }
                self.allow_close = true;
                if let Some(c) = ctx {
                    c.send_viewport_cmd(ViewportCommand::Close);
                }
            }
        }
    }

    /// Saves to the study's file, or asks for one; then continues with `then`. A failed
    /// save says why and leaves the study unsaved (and `then` not done).
    pub(super) fn save_or_ask(&mut self, then: AfterSave, ctx: &egui::Context) {
        match self.doc.path().map(Path::to_path_buf) {
            Some(p) => match self.save_to(&p) {
                Ok(()) => self.proceed(then, Some(ctx)),
                Err(e) => self.error = Some(e.to_string()),
            },
            None => self.save_as(then),
        }
    }

    pub(super) fn save_as(&mut self, then: AfterSave) {
        let name = self
            .doc
            .path()
            .and_then(Path::file_name)
            .map_or_else(|| "study.ron".to_string(), |n| n.to_string_lossy().into_owned());
        self.request_file(FileRequest {
            purpose: FilePurpose::SaveStudy { then },
            title: "Save the study as".into(),
            save: true,
            filter_name: "Quenchless study",
            extensions: &["ron"],
            file_name: Some(name),
            folder: None,
        });
    }
}
