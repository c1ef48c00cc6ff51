//! The app: one study being edited, its cached results, the panels, the file
//! commands, undo/redo, prompts, recovery and exports.

use crate::compute::{Quality, ResultCache, StudyResults};
use crate::demo::demo_study;
use crate::edits::{next_colour, unique_name};
use crate::export::{SvgSeries, columns_words, export_played, plot_svg, save_png};
use crate::file_chooser::{
    AfterSave, BuiltInChooser, ChooserOutcome, DialogChoice, DialogPreference, FilePurpose, FileRequest, RfdDialogs,
    SystemDialogs, choose_dialog,
};
use crate::files::{PREFS_KEY, Preferences, clear_recovery, default_recovery_path, read_recovery, write_recovery};
use crate::handles::Handle;
use crate::history::EditHistory;
use crate::panels::candidates::{CandidatePanel, CandidateRequest};
use crate::panels::compare::ComparePanel;
use crate::panels::cycle::CyclePanel;
use crate::panels::design::DesignPanel;
use crate::panels::plots::{Quantity, ShapingPanel, diagnostic_plot};
use crate::panels::verdict::verdict_ui;
use crate::widgets::colour_of;
use crate::widgets::{Allowed, Kind, value_field};
use egui::{Key, KeyboardShortcut, Modifiers, Pos2, RichText, ViewportCommand};
use quenchless_physics::ramp::SampledColumn;
use quenchless_profile::header::CAUTION;
use quenchless_profile::study::{CandidateRamp, RampSpec};
use quenchless_profile::waveform::{ExportColumns, read_waveform};
use quenchless_profile::{Study, load_study, save_study};
use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::sync::mpsc::{Receiver, Sender, channel};
use std::time::{Duration, Instant};

/// Interval between recovery writes while there are unsaved changes.
pub const AUTOSAVE_INTERVAL: Duration = Duration::from_secs(30);

/// How to start the app.
#[derive(Debug, Clone, Default)]
pub struct AppOptions {
    /// A study file to open instead of the built-in scenario.
    pub open: Option<PathBuf>,
    /// Where the recovery copy lives (`None`: no recovery file at all).
    pub recovery_path: Option<PathBuf>,
    /// The system's file dialogs (`None`: only the built-in chooser, as in tests and
    /// benchmarks, where a system dialog would block the run).
    pub system_dialogs: Option<Arc<dyn SystemDialogs>>,
}

impl AppOptions {
    /// The options of the desktop app: recovery next to eframe's storage.
    pub fn desktop(open: Option<PathBuf>) -> Self {
        Self { open, recovery_path: default_recovery_path(), system_dialogs: Some(Arc::new(RfdDialogs)) }
    }
}

/// The pages of the central area.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Page {
    /// Shaping plot, verdict and diagnostics.
    Shape,
    /// Comparison table.
    Compare,
    /// Engine cycle.
    Cycle,
    /// Synthesis, playback, robustness and noise maps, spline optimiser.
    Design,
}

/// Something to do after the frame's layout.
#[derive(Debug, Clone, PartialEq)]
#[must_use]
enum Command {
    New,
    Open(Option<PathBuf>),
    Save,
    SaveAs,
    Undo,
    Redo,
    Quit,
    ImportWaveform,
    ExportCsv(usize),
    Png(Option<String>),
    Svg(Quantity),
}

#[derive(Debug, Clone)]
enum Prompt {
    Unsaved(AfterSave),
    Restore(Box<Study>, Option<PathBuf>),
    Caution(usize),
}

#[derive(Debug, Clone)]
struct ExportDialog {
    candidate: usize,
    rate: f64,
    columns: ExportColumns,
    accept_broken_limits: bool,
}

/// The Quenchless desktop app.
pub struct QuenchlessApp {
    study: Study,
    /// The latest study that passed validation: an edit that breaks a rule is undone
    /// back to it, with a message naming the field, the value and what is allowed.
    last_valid: Study,
    saved: Study,
    path: Option<PathBuf>,
    history: EditHistory,
    cache: ResultCache,
    selected: usize,
    page: Page,
    candidates_panel: CandidatePanel,
    shaping: ShapingPanel,
    compare: ComparePanel,
    cycle: CyclePanel,
    design: DesignPanel,
    prompt: Option<Prompt>,
    export: Option<ExportDialog>,
    caution_acknowledged: bool,
    error: Option<String>,
    status: String,
    prefs: Preferences,
    recovery_path: Option<PathBuf>,
    system_dialogs: Option<Arc<dyn SystemDialogs>>,
    chooser: BuiltInChooser,
    /// Whether the user was told why the built-in chooser stands in for the system's.
    fallback_noted: bool,
    /// A PNG to take once the chooser is off the screen: (plot or window, file).
    png_pending: Option<(Option<String>, PathBuf)>,
    last_autosave: Instant,
    allow_close: bool,
    plot_rects: Vec<(String, egui::Rect)>,
    png_tx: Sender<Result<PathBuf, String>>,
    png_rx: Receiver<Result<PathBuf, String>>,
    theme_applied: Option<bool>,
}

fn fresh_study() -> Study {
    let mut s = Study { name: "New study".into(), ..Study::default() };
    crate::edits::add_candidate(&mut s, "linear");
    s
}

impl QuenchlessApp {
    /// The app inside eframe: preferences from eframe's storage.
    pub fn new(cc: &eframe::CreationContext<'_>, options: AppOptions) -> Self {
        let mut app = Self::headless(options);
        if let Some(p) = cc.storage.and_then(|s| eframe::get_value::<Preferences>(s, PREFS_KEY)) {
            app.prefs = p;
        }
        app
    }

    /// The app without a window (tests, benchmarks): the same state and panels.
    pub fn headless(options: AppOptions) -> Self {
        let study = demo_study();
        let (png_tx, png_rx) = channel();
        let mut app = Self {
            history: EditHistory::new(&study),
            saved: study.clone(),
            last_valid: study.clone(),
            study,
            path: None,
            cache: ResultCache::default(),
            selected: 0,
            page: Page::Shape,
            candidates_panel: CandidatePanel::default(),
            shaping: ShapingPanel::default(),
            compare: ComparePanel::default(),
            cycle: CyclePanel::default(),
            design: DesignPanel::default(),
            prompt: None,
            export: None,
            caution_acknowledged: false,
            error: None,
            status: "Built-in invented scenario: every number is made up".into(),
            prefs: Preferences::default(),
            recovery_path: options.recovery_path,
            system_dialogs: options.system_dialogs,
            chooser: BuiltInChooser::default(),
            fallback_noted: false,
            png_pending: None,
            last_autosave: Instant::now(),
            allow_close: false,
            plot_rects: Vec::new(),
            png_tx,
            png_rx,
            theme_applied: None,
        };
        if let Some(p) = options.open
            && let Err(e) = app.open_file(&p)
        {
            app.error = Some(e);
        }
        if let Some(rp) = app.recovery_path.clone()
            && let Some((s, origin)) = read_recovery(&rp)
        {
            app.prompt = Some(Prompt::Restore(Box::new(s), origin));
        }
        app
    }

    /// The study being edited.
    pub fn study(&self) -> &Study {
        &self.study
    }

    /// Mutable access to the study (an edit like any other: undoable once committed).
    pub fn study_mut(&mut self) -> &mut Study {
        &mut self.study
    }

    /// Index of the selected candidate.
    pub fn selected(&self) -> usize {
        self.selected
    }

    /// Selects a candidate.
    pub fn select(&mut self, i: usize) {
        self.selected = i.min(self.study.candidates.len().saturating_sub(1));
    }

    /// The file the study belongs to.
    pub fn path(&self) -> Option<&Path> {
        self.path.as_deref()
    }

    /// The error shown in the app, if any.
    pub fn error(&self) -> Option<&str> {
        self.error.as_deref()
    }

    /// Whether there are unsaved changes.
    pub fn is_dirty(&self) -> bool {
        self.study != self.saved
    }

    /// Whether a prompt (unsaved changes, restore, caution) is open.
    pub fn has_prompt(&self) -> bool {
        self.prompt.is_some()
    }

    /// Where the handles of the selected candidate were last drawn, screen points.
    pub fn handle_positions(&self) -> &[(Handle, Pos2)] {
        &self.shaping.handle_positions
    }

    /// The plots drawn in the latest frame: title and screen rectangle.
    pub fn plot_areas(&self) -> &[(String, egui::Rect)] {
        &self.plot_rects
    }

    /// Shows a page.
    pub fn show_page(&mut self, page: Page) {
        self.page = page;
    }

    /// The per-frame recompute (cached: only a changed study is evaluated again).
    pub fn results(&mut self, quality: Quality) -> &StudyResults {
        self.cache.get(&self.study, quality)
    }

    /// The cycle page (its power-map job).
    pub fn cycle_panel(&mut self) -> &mut CyclePanel {
        &mut self.cycle
    }

    /// The design page (its jobs and results).
    pub fn design_panel(&mut self) -> &mut DesignPanel {
        &mut self.design
    }

    /// Collects finished background work (the app does this every frame).
    pub fn poll_jobs(&mut self) {
        self.cycle.poll();
        self.design.poll();
    }

    /// Opens a study file at once (no prompt). On failure the current study stays
    /// and the error (file, line or field, what is wrong) is returned.
    pub fn open_file(&mut self, path: &Path) -> Result<(), String> {
        match load_study(path) {
            Ok(s) => {
                self.history = EditHistory::new(&s);
                self.saved = s.clone();
                self.study = s;
                self.path = Some(path.to_path_buf());
                self.selected = 0;
                self.error = None;
                self.status = format!("Opened {}", path.display());
                // The caution speaks of this study's apparatus: ask again.
                self.caution_acknowledged = false;
                self.prefs.remember(path);
                Ok(())
            }
            Err(e) => Err(format!("Could not open the study; the current one is kept. {e}")),
        }
    }

    /// Saves the study to a file (atomic); it becomes the study's file.
    pub fn save_to(&mut self, path: &Path) -> Result<(), String> {
        save_study(&self.study, path).map_err(|e| format!("Not saved: {e}"))?;
        self.saved = self.study.clone();
        self.path = Some(path.to_path_buf());
        self.status = format!("Saved {}", path.display());
        self.prefs.remember(path);
        if let Some(r) = &self.recovery_path {
            clear_recovery(r);
        }
        Ok(())
    }

    /// Keeps the study valid: a change since the last valid study is checked with the
    /// profile crate's validation; a change that breaks a rule is reverted and the
    /// reason shown. Returns the refusal, if any. The app calls this every frame.
    pub fn enforce_valid(&mut self) -> Option<String> {
        if self.study == self.last_valid {
            return None;
        }
        let checked = quenchless_profile::convert::validate(&self.study)
            .map_err(|e| e.user_message())
            .and_then(|()| crate::interactive::check_interactive(&self.study));
        match checked {
            Ok(()) => {
                self.last_valid = self.study.clone();
                None
            }
            Err(e) => {
                let msg = format!("Not applied: {e}. The previous value is kept.");
                self.study = self.last_valid.clone();
                self.select(self.selected);
                self.error = Some(msg.clone());
                Some(msg)
            }
        }
    }

    /// Undoes the latest step.
    pub fn undo(&mut self) {
        if let Some(s) = self.history.undo(&self.study) {
            self.study = s;
            self.select(self.selected);
        }
    }

    /// Redoes the latest undone step.
    pub fn redo(&mut self) {
        if let Some(s) = self.history.redo(&self.study) {
            self.study = s;
            self.select(self.selected);
        }
    }

    /// Records the current study as an undo step (the app does this whenever no
    /// gesture is in progress).
    pub fn commit_edit(&mut self) {
        self.history.commit(&self.study);
    }

    /// Chooses which file dialog to use (the View menu's setting).
    pub fn set_dialog_preference(&mut self, p: crate::file_chooser::DialogPreference) {
        self.prefs.dialogs = p;
    }

    /// Opens the export dialog for candidate `i` (the caution must be acknowledged).
    pub fn open_export_dialog_for(&mut self, i: usize) {
        if self.caution_acknowledged {
            self.open_export_dialog(i);
        }
    }

    /// Confirms the export safety caution for this session.
    pub fn acknowledge_caution(&mut self) {
        self.caution_acknowledged = true;
    }

    /// Exports candidate i as CSV. Refused before the caution was acknowledged, and
    /// for a ramp that breaks stated limits unless `accept_broken_limits`.
    pub fn export_candidate(
        &mut self,
        i: usize,
        path: &Path,
        rate: f64,
        columns: ExportColumns,
        accept_broken_limits: bool,
    ) -> Result<usize, String> {
        if !self.caution_acknowledged {
            return Err("export: read and confirm the safety caution first".into());
        }
        let name = self.study.candidates.get(i).map(|c| c.name.clone()).unwrap_or_default();
        let (rows, a) = export_played(&self.study, i, rate, columns, accept_broken_limits, path)?;
        self.status =
            format!("Exported {rows} rows of “{name}” to {} (as played: {})", path.display(), a.verdict().word());
        Ok(rows)
    }

    /// Imports a CSV waveform as a new candidate; returns its index.
    pub fn import_waveform(&mut self, path: &Path) -> Result<usize, String> {
        let table = read_waveform(path).map_err(|e| format!("Could not import the waveform: {e}"))?;
        // A file that states how it is read (our own exports say `hold`) is read so.
        let hold = table.reading == Some(quenchless_physics::ramp::SampledReading::Hold);
        let t0 = table.times_s.first().copied().unwrap_or(0.0);
        let spec = RampSpec::Waveform {
            source: path.display().to_string(),
            omega2_column: table.column == SampledColumn::Omega2,
            hold,
            times_s: table.times_s.iter().map(|t| t - t0).collect(),
            values: table.values,
            end_frequencies_rad_s: table.end_frequencies_rad_s,
        };
        quenchless_profile::convert::ramp_from_spec(&spec, "waveform")
            .map_err(|e| format!("Could not import the waveform: {}: {e}", path.display()))?;
        let base = path.file_stem().map_or_else(|| "imported".to_string(), |s| s.to_string_lossy().into_owned());
        let name = unique_name(&self.study, &base);
        let colour = Some(next_colour(&self.study));
        self.study.candidates.push(CandidateRamp { name, visible: true, colour, ramp: spec });
        self.selected = self.study.candidates.len() - 1;
        Ok(self.selected)
    }

    fn run(&mut self, cmd: Command, ctx: &egui::Context) {
        match cmd {
            Command::New => self.guard(AfterSave::New),
            Command::Open(p) => self.guard(AfterSave::Open(p)),
            Command::Quit => {
                if self.is_dirty() {
                    self.prompt = Some(Prompt::Unsaved(AfterSave::Quit));
                } else {
                    self.allow_close = true;
                    ctx.send_viewport_cmd(ViewportCommand::Close);
                }
            }
            Command::Save => self.save_or_ask(AfterSave::Nothing, ctx),
            Command::SaveAs => self.save_as(AfterSave::Nothing),
            Command::Undo => self.undo(),
            Command::Redo => self.redo(),
            Command::ImportWaveform => self.request_file(FileRequest {
                purpose: FilePurpose::ImportWaveform,
                title: "Import a waveform as a candidate".into(),
                save: false,
                filter_name: "waveform",
                extensions: &["csv", "txt"],
                file_name: None,
                folder: None,
            }),
            Command::ExportCsv(i) => {
                if self.caution_acknowledged {
                    self.open_export_dialog(i);
                } else {
                    self.prompt = Some(Prompt::Caution(i));
                }
            }
            Command::Png(which) => {
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
            Command::Svg(q) => self.request_file(FileRequest {
                purpose: FilePurpose::Svg(q.title().to_string()),
                title: format!("Save “{}” as SVG", q.title()),
                save: true,
                filter_name: "SVG image",
                extensions: &["svg"],
                file_name: Some("quenchless-plot.svg".into()),
                folder: None,
            }),
        }
    }

    /// Asks for a file: the system's dialog where one can be shown, else the built-in
    /// chooser (saying once why).
    fn request_file(&mut self, mut request: FileRequest) {
        if request.folder.is_none() {
            request.folder = self.path.as_ref().and_then(|p| p.parent()).map(Path::to_path_buf);
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
    fn file_chosen(&mut self, purpose: FilePurpose, path: PathBuf, ctx: Option<&egui::Context>) {
        match purpose {
            FilePurpose::OpenStudy => {
                if let Err(e) = self.open_file(&path) {
                    self.error = Some(e);
                }
            }
            FilePurpose::SaveStudy { then } => match self.save_to(&path) {
                Ok(()) => self.proceed(then, ctx),
                Err(e) => self.error = Some(e),
            },
            FilePurpose::ImportWaveform => {
                if let Err(e) = self.import_waveform(&path) {
                    self.error = Some(e);
                }
            }
            FilePurpose::ExportCsv { candidate, rate, columns, accept_broken_limits } => {
                match self.export_candidate(candidate, &path, rate, columns, accept_broken_limits) {
                    Ok(_) => self.export = None,
                    Err(e) => self.error = Some(e),
                }
            }
            // Taken next frame, once the chooser is off the screen.
            FilePurpose::Png(which) => self.png_pending = Some((which, path)),
            FilePurpose::Svg(title) => {
                let Some(q) = Quantity::ALL.iter().copied().find(|q| q.title() == title) else { return };
                let svg = self.plot_as_svg(q);
                match quenchless_profile::storage::write_atomically(&path, svg.as_bytes()) {
                    Ok(()) => self.status = format!("Saved {}", path.display()),
                    Err(e) => self.error = Some(format!("SVG not saved: {e}")),
                }
            }
        }
    }

    /// Takes a pending PNG (the window, or the crop of a plot drawn this frame).
    fn take_png(&mut self, ctx: &egui::Context) {
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

    /// A plot of every visible candidate as SVG at publication size.
    pub fn plot_as_svg(&mut self, q: Quantity) -> String {
        let study = self.study.clone();
        let results = self.cache.get(&study, Quality::SETTLED);
        let mut series = Vec::new();
        for (i, (c, r)) in study.candidates.iter().zip(&results.candidates).enumerate() {
            if let (true, Ok(o)) = (c.visible, r) {
                for (curve, dashed) in q.curves(&o.series) {
                    series.push(SvgSeries {
                        name: &c.name,
                        colour: colour_of(&study, i).to_srgba_unmultiplied()[..3].try_into().unwrap_or([0, 0, 0]),
                        curve,
                        dashed,
                    });
                }
            }
        }
        plot_svg(q.title(), &results.scale.x_label(), &q.y_label(results), &series)
    }

    fn open_export_dialog(&mut self, i: usize) {
        let rate = self.study.generator.as_ref().map_or(100e6, |g| g.sample_rate_per_s);
        self.export =
            Some(ExportDialog { candidate: i, rate, columns: ExportColumns::Si, accept_broken_limits: false });
    }

    fn guard(&mut self, then: AfterSave) {
        if self.is_dirty() {
            self.prompt = Some(Prompt::Unsaved(then));
        } else {
            self.proceed(then, None);
        }
    }

    fn proceed(&mut self, then: AfterSave, ctx: Option<&egui::Context>) {
        match then {
            AfterSave::New => {
                let s = fresh_study();
                self.history = EditHistory::new(&s);
                self.saved = s.clone();
                self.study = s;
                self.path = None;
                self.selected = 0;
                self.status = "New study".into();
            }
            AfterSave::Open(Some(p)) => {
                if let Err(e) = self.open_file(&p) {
                    self.error = Some(e);
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
    fn save_or_ask(&mut self, then: AfterSave, ctx: &egui::Context) {
        match self.path.clone() {
            Some(p) => match self.save_to(&p) {
                Ok(()) => self.proceed(then, Some(ctx)),
                Err(e) => self.error = Some(e),
            },
            None => self.save_as(then),
        }
    }

    fn save_as(&mut self, then: AfterSave) {
        let name = self
            .path
            .as_ref()
            .and_then(|p| p.file_name())
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

    fn shortcuts(ctx: &egui::Context) -> Vec<Command> {
        let mut out = Vec::new();
        let typing = ctx.memory(|m| m.focused().is_some());
        ctx.input_mut(|i| {
            let cs = Modifiers::COMMAND | Modifiers::SHIFT;
            if i.consume_shortcut(&KeyboardShortcut::new(cs, Key::S)) {
                out.push(Command::SaveAs);
            }
            if i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::S)) {
                out.push(Command::Save);
            }
            if i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::O)) {
                out.push(Command::Open(None));
            }
            if !typing {
                if i.consume_shortcut(&KeyboardShortcut::new(cs, Key::Z))
                    || i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::Y))
                {
                    out.push(Command::Redo);
                }
                if i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::Z)) {
                    out.push(Command::Undo);
                }
            }
        });
        out
    }

    fn menu_ui(&mut self, ui: &mut egui::Ui, commands: &mut Vec<Command>) {
        egui::MenuBar::new().ui(ui, |ui| {
            ui.menu_button("File", |ui| {
                if ui.button("New study").clicked() {
                    commands.push(Command::New);
                }
                if ui.button("Open study…  (Ctrl+O)").clicked() {
                    commands.push(Command::Open(None));
                }
                ui.menu_button("Open recent", |ui| {
                    if self.prefs.recent.is_empty() {
                        ui.label("(none yet)");
                    }
                    for p in &self.prefs.recent {
                        if ui.button(p.display().to_string()).clicked() {
                            commands.push(Command::Open(Some(p.clone())));
                        }
                    }
                });
                if ui.button("Save  (Ctrl+S)").clicked() {
                    commands.push(Command::Save);
                }
                if ui.button("Save as…  (Ctrl+Shift+S)").clicked() {
                    commands.push(Command::SaveAs);
                }
                ui.separator();
                if ui.button("Import waveform CSV…").clicked() {
                    commands.push(Command::ImportWaveform);
                }
                if ui.button("Export selected ramp as CSV…").clicked() {
                    commands.push(Command::ExportCsv(self.selected));
                }
                if ui.button("Save window as PNG…").clicked() {
                    commands.push(Command::Png(None));
                }
                ui.menu_button("Save a plot as PNG", |ui| {
                    for (name, _) in &self.plot_rects {
                        if ui.button(name).clicked() {
                            commands.push(Command::Png(Some(name.clone())));
                        }
                    }
                });
                ui.menu_button("Save a plot as SVG", |ui| {
                    for q in std::iter::once(Quantity::Omega).chain(Quantity::DIAGNOSTICS).chain([Quantity::Coherence])
                    {
                        if ui.button(q.title()).clicked() {
                            commands.push(Command::Svg(q));
                        }
                    }
                });
                ui.separator();
                if ui.button("Quit").clicked() {
                    commands.push(Command::Quit);
                }
            });
            ui.menu_button("Edit", |ui| {
                if ui.add_enabled(self.history.can_undo(&self.study), egui::Button::new("Undo  (Ctrl+Z)")).clicked() {
                    commands.push(Command::Undo);
                }
                if ui
                    .add_enabled(self.history.can_redo(&self.study), egui::Button::new("Redo  (Ctrl+Shift+Z)"))
                    .clicked()
                {
                    commands.push(Command::Redo);
                }
            });
            ui.menu_button("View", |ui| {
                ui.checkbox(&mut self.prefs.dark, "dark theme");
                ui.checkbox(&mut self.study.display.dimensionless, "dimensionless view");
                ui.checkbox(&mut self.shaping.show_coherence, "coherence ratio instead of L and C");
                ui.menu_button("File dialogs", |ui| {
                    for p in [DialogPreference::Automatic, DialogPreference::System, DialogPreference::BuiltIn] {
                        ui.radio_value(&mut self.prefs.dialogs, p, p.words());
                    }
                });
            });
            ui.separator();
            for (page, name) in [
                (Page::Shape, "Shape & watch"),
                (Page::Compare, "Compare candidates"),
                (Page::Cycle, "Engine cycle"),
                (Page::Design, "Design & hardware"),
            ] {
                if ui.selectable_label(self.page == page, name).clicked() {
                    self.page = page;
                }
            }
        });
    }

    fn prompt_ui(&mut self, ctx: &egui::Context) {
        let Some(prompt) = self.prompt.clone() else { return };
        let mut close = false;
        egui::Window::new("Quenchless asks")
            .collapsible(false)
            .resizable(false)
            .anchor(egui::Align2::CENTER_CENTER, [0.0, 0.0])
            .show(ctx, |ui| match prompt {
                Prompt::Unsaved(then) => {
                    ui.label(format!("“{}” has unsaved changes.", self.study.name));
                    ui.horizontal(|ui| {
                        if ui.button("Save first").clicked() {
                            close = true;
                            self.save_or_ask(then.clone(), ctx);
                        }
                        if ui.button("Discard changes").clicked() {
                            close = true;
                            self.saved = self.study.clone();
                            if let Some(r) = &self.recovery_path {
                                clear_recovery(r);
                            }
                            self.proceed(then.clone(), Some(ctx));
                        }
                        if ui.button("Keep editing").clicked() {
                            close = true;
                        }
                    });
                }
                Prompt::Restore(study, origin) => {
                    ui.label("Quenchless found unsaved work from an earlier session that did not end normally.");
                    ui.label(format!(
                        "Study: “{}”{}",
                        study.name,
                        origin.as_ref().map_or_else(String::new, |p| format!(" (from {})", p.display()))
                    ));
                    ui.horizontal(|ui| {
                        if ui.button("Restore it").clicked() {
                            close = true;
                            if let Err(e) = quenchless_profile::convert::validate(&study) {
                                self.error = Some(format!(
                                    "The unsaved work cannot be restored as it is: {}. Its recovery file is kept.",
                                    e.user_message()
                                ));
                                return;
                            }
                            self.study = (*study).clone();
                            self.history.commit(&self.study);
                            self.path.clone_from(&origin);
                            self.saved =
                                origin.as_deref().and_then(|p| load_study(p).ok()).unwrap_or_else(Study::default);
                            self.select(0);
                            self.status = "Restored unsaved work; save it to keep it".into();
                        }
                        if ui.button("Discard it").clicked() {
                            close = true;
                            if let Some(r) = &self.recovery_path {
                                clear_recovery(r);
                            }
                        }
                    });
                }
                Prompt::Caution(i) => {
                    ui.label(RichText::new("Warning: Before you export a waveform").strong().size(16.0));
                    ui.add(egui::Label::new(CAUTION).wrap());
                    ui.horizontal(|ui| {
                        if ui.button("I understand; continue").clicked() {
                            close = true;
                            self.caution_acknowledged = true;
                            self.open_export_dialog(i);
                        }
                        if ui.button("Cancel export").clicked() {
                            close = true;
                        }
                    });
                }
            });
        if close {
            self.prompt = None;
        }
    }

    fn export_ui(&mut self, ctx: &egui::Context) {
        let Some(mut d) = self.export.clone() else { return };
        let mut open = true;
        let mut go = false;
        let study = self.study.clone();
        let results = self.cache.get(&study, Quality::SETTLED);
        let mut inverts = false;
        let negative_drive = study.generator.as_ref().and_then(|g| g.drive.as_ref()).is_none_or(|d| d.can_go_negative);
        let (name, broken, err) = match (study.candidates.get(d.candidate), results.candidates.get(d.candidate)) {
            (Some(c), Some(Ok(o))) => {
                inverts = o.evaluation.report.inverts();
                (c.name.clone(), !o.evaluation.report.within_limits(), None)
            }
            (Some(c), Some(Err(e))) => (c.name.clone(), false, Some(e.clone())),
            _ => (String::new(), false, Some("no such candidate".to_string())),
        };
        egui::Window::new("Export waveform").open(&mut open).collapsible(false).show(ctx, |ui| {
            ui.label(format!("Candidate: “{name}”"));
            if let Some(e) = &err {
                ui.colored_label(ui.visuals().error_fg_color, e);
                return;
            }
            value_field(ui, "Sample rate [samples/s]", &mut d.rate, Kind::Number, Allowed::Positive);
            egui::ComboBox::from_label("columns").selected_text(columns_words(d.columns)).show_ui(ui, |ui| {
                for c in [ExportColumns::Si, ExportColumns::LabMicrosecondsKilohertz, ExportColumns::Omega2] {
                    ui.selectable_value(&mut d.columns, c, columns_words(c));
                }
            });
            if broken {
                ui.colored_label(egui::Color32::from_rgb(210, 120, 0), "Warning: This ramp breaks the limits stated in the study. It will be written unchanged, never clipped.");
                ui.checkbox(&mut d.accept_broken_limits, "Export it anyway; I will check it against the apparatus");
            }
            if inverts && !negative_drive {
                ui.colored_label(
                    ui.visuals().error_fg_color,
                    "This ramp inverts the trap (ω² < 0), and the study's drive cannot go negative: it cannot be played as designed.",
                );
            } else if inverts {
                ui.colored_label(ui.visuals().warn_fg_color, "Warning: this ramp inverts the trap (ω² < 0); the file says where.");
            }
            ui.small("The file is the trap as the generator plays it (the study's generator settings at this rate), held row by row, ending on the level the generator must hold. It starts with # lines: tool version, study, settings, the checks made and the caution.");
            if ui.add_enabled(!broken || d.accept_broken_limits, egui::Button::new("Choose file and export")).clicked() {
                go = true;
            }
        });
        self.export = open.then_some(d.clone());
        if go {
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
    }

    fn shape_page(&mut self, ui: &mut egui::Ui) {
        let quality = if self.shaping.drag.is_some() { Quality::LIVE } else { Quality::SETTLED };
        self.cache.get(&self.study, quality);
        let Some(results) = self.cache.latest() else { return };
        verdict_ui(ui, &self.study, results, self.selected);
        ui.horizontal(|ui| {
            ui.checkbox(&mut self.shaping.constraints.lock_ends, "keep end points fixed")
                .on_hover_text("End frequencies (and a spline's last knot time) stay put while you drag");
            ui.checkbox(&mut self.shaping.constraints.snap, "snap to grid")
                .on_hover_text("Times to 1/40 of the duration, frequencies to 1 % of the start");
            ui.label("Drag a handle; click to add a spline knot; Ctrl+click or right-click a knot to remove it");
        });
        let avail = ui.available_height();
        egui::ScrollArea::vertical().id_salt("shape-scroll").show(ui, |ui| {
            let h = (avail * 0.42).clamp(200.0, 420.0);
            if let Some(r) = self.shaping.ui(ui, &mut self.study, results, self.selected, h) {
                self.plot_rects.push((Quantity::Omega.title().into(), r));
            }
            let quantities: Vec<Quantity> = Quantity::DIAGNOSTICS
                .iter()
                .map(|q| if *q == Quantity::LandC && self.shaping.show_coherence { Quantity::Coherence } else { *q })
                .collect();
            let dh = 150.0;
            for pair in quantities.chunks(2) {
                ui.columns(2, |cols| {
                    for (col, q) in cols.iter_mut().zip(pair) {
                        let r = diagnostic_plot(col, *q, &self.study, results, self.selected, dh);
                        self.plot_rects.push((q.title().into(), r));
                    }
                });
            }
        });
    }
}

impl eframe::App for QuenchlessApp {
    fn logic(&mut self, ctx: &egui::Context, _frame: &mut eframe::Frame) {
        self.poll_jobs();
        while let Ok(r) = self.png_rx.try_recv() {
            match r {
                Ok(p) => self.status = format!("Saved {}", p.display()),
                Err(e) => self.error = Some(format!("PNG not saved: {e}")),
            }
        }
        if self.is_dirty() && self.last_autosave.elapsed() >= AUTOSAVE_INTERVAL {
            self.last_autosave = Instant::now();
            if let Some(r) = &self.recovery_path
                && let Err(e) = write_recovery(r, &self.study, self.path.as_deref())
            {
                self.status = format!("Recovery copy not written: {e}");
            }
        }
        if self.cycle.busy() || self.design.busy() {
            ctx.request_repaint_after(Duration::from_millis(100));
        }
    }

    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
        let ctx = ui.ctx().clone();
        if self.theme_applied != Some(self.prefs.dark) {
            ctx.set_theme(if self.prefs.dark { egui::Theme::Dark } else { egui::Theme::Light });
            self.theme_applied = Some(self.prefs.dark);
        }
        let mut commands = Self::shortcuts(&ctx);
        if ctx.input(|i| i.viewport().close_requested()) && !self.allow_close && self.is_dirty() {
            ctx.send_viewport_cmd(ViewportCommand::CancelClose);
            self.prompt = Some(Prompt::Unsaved(AfterSave::Quit));
        }
        self.plot_rects.clear();
        egui::Panel::top("menu-bar").show(ui, |ui| self.menu_ui(ui, &mut commands));
        egui::Panel::bottom("status-line").show(ui, |ui| {
            ui.horizontal(|ui| {
                let file = self
                    .path
                    .as_ref()
                    .map_or_else(|| "not saved to a file yet".to_string(), |p| p.display().to_string());
                ui.label(format!("{} — {file}", self.study.name));
                if self.is_dirty() {
                    ui.colored_label(egui::Color32::from_rgb(210, 120, 0), "* unsaved changes");
                }
                ui.separator();
                ui.label(format!("recompute {:.2} ms", self.cache.last_seconds * 1e3));
                ui.separator();
                ui.label(&self.status);
            });
        });
        let results_ready =
            self.cache.get(&self.study, if self.shaping.drag.is_some() { Quality::LIVE } else { Quality::SETTLED });
        let _ = results_ready;
        egui::Panel::left("candidates").resizable(true).default_size(330.0).show(ui, |ui| {
            egui::ScrollArea::vertical().id_salt("left-scroll").show(ui, |ui| {
                let Some(results) = self.cache.latest() else { return };
                match self.candidates_panel.ui(ui, &mut self.study, &mut self.selected, results) {
                    Some(CandidateRequest::ImportWaveform) => commands.push(Command::ImportWaveform),
                    Some(CandidateRequest::Export(i)) => commands.push(Command::ExportCsv(i)),
                    None => {}
                }
            });
        });
        // The central page computes with the study: refuse a bad edit of the list first.
        self.enforce_valid();
        egui::CentralPanel::default().show(ui, |ui| {
            if let Some(e) = self.error.clone() {
                egui::Frame::group(ui.style()).fill(ui.visuals().extreme_bg_color).show(ui, |ui| {
                    ui.horizontal_wrapped(|ui| {
                        ui.colored_label(ui.visuals().error_fg_color, RichText::new(e).strong());
                        if ui.button("Dismiss").clicked() {
                            self.error = None;
                        }
                    });
                });
            }
            match self.page {
                Page::Shape => self.shape_page(ui),
                Page::Compare => {
                    if let Some(results) = self.cache.latest() {
                        self.compare.ui(ui, &self.study, results, &mut self.selected);
                    }
                }
                Page::Cycle => {
                    egui::ScrollArea::vertical().id_salt("cycle-scroll").show(ui, |ui| {
                        if let Some(results) = self.cache.latest() {
                            self.cycle.ui(ui, &mut self.study, results);
                        }
                    });
                }
                Page::Design => {
                    egui::ScrollArea::vertical().id_salt("design-scroll").show(ui, |ui| {
                        if let Some(results) = self.cache.latest() {
                            self.design.ui(ui, &mut self.study, results, &mut self.selected);
                        }
                    });
                }
            }
        });
        self.enforce_valid();
        self.take_png(&ctx);
        self.prompt_ui(&ctx);
        self.export_ui(&ctx);
        if let Some(ChooserOutcome::Chosen(purpose, path)) = self.chooser.ui(&ctx) {
            self.file_chosen(purpose, path, Some(&ctx));
        }
        for c in commands {
            self.run(c, &ctx);
        }
        self.select(self.selected);
        self.enforce_valid();
        // One gesture (a drag, a slider) becomes one undo step when the pointer is up.
        if !ctx.input(|i| i.pointer.any_down()) && self.shaping.drag.is_none() {
            self.history.commit(&self.study);
        }
    }

    fn save(&mut self, storage: &mut dyn eframe::Storage) {
        eframe::set_value(storage, PREFS_KEY, &self.prefs);
    }

    fn on_exit(&mut self, _gl: Option<&eframe::glow::Context>) {
        if let Some(r) = &self.recovery_path {
            if self.is_dirty() && !self.allow_close {
                let _ = write_recovery(r, &self.study, self.path.as_deref());
            } else {
                clear_recovery(r);
            }
        }
    }
}
