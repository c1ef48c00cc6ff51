//! The app: it composes the document, the panels, the menu, the prompts, the export
//! window and the file chooser, and carries out what they return. Nothing imports it;
//! the file commands are in `app/file_actions.rs`.

mod file_actions;

use crate::compute::{Quality, ResultCache, StudyResults};
use crate::demo::demo_study;
use crate::document::Document;
use crate::export_dialog::{ExportAnswer, ExportDialog, export_ui};
use crate::file_chooser::{AfterSave, BuiltInChooser, ChooserOutcome, RfdDialogs, SystemDialogs};
use crate::files::{PREFS_KEY, Preferences, clear_recovery, default_recovery_path, read_recovery, write_recovery};
use crate::handles::Handle;
use crate::menu::{Command, MenuState, Page, menu_ui, shortcuts};
use crate::panels::candidates::{CandidatePanel, CandidateRequest};
use crate::panels::compare::ComparePanel;
use crate::panels::cycle::CyclePanel;
use crate::panels::design::DesignPanel;
use crate::panels::plots::{Quantity, ShapingPanel, diagnostic_plot};
use crate::panels::verdict::verdict_ui;
use crate::prompts::{Prompt, PromptAnswer, prompt_ui};
use egui::{Pos2, RichText, ViewportCommand};
use quenchless_profile::Study;
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
    /// A folder outside which no chosen file is read or written (random-interaction
    /// tests); `None`: anywhere.
    pub sandbox: Option<PathBuf>,
}

impl AppOptions {
    /// The options of the desktop app: recovery next to eframe's storage.
    pub fn desktop(open: Option<PathBuf>) -> Self {
        Self { open, recovery_path: default_recovery_path(), system_dialogs: Some(Arc::new(RfdDialogs)), sandbox: None }
    }
}

/// The Quenchless desktop app.
pub struct QuenchlessApp {
    doc: Document,
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
    sandbox: Option<PathBuf>,
    chooser: BuiltInChooser,
    /// Whether the user was told why the built-in chooser stands in for the system's.
    fallback_noted: bool,
    /// A PNG to take once the chooser is off the screen: (plot or window, file).
    png_pending: Option<(Option<String>, PathBuf)>,
    last_autosave: Instant,
    allow_close: bool,
    plot_rects: Vec<(String, egui::Rect)>,
    /// Requests the central page's plots made this frame (their context menus).
    pending_commands: Vec<Command>,
    png_tx: Sender<Result<PathBuf, String>>,
    png_rx: Receiver<Result<PathBuf, String>>,
    theme_applied: Option<bool>,
    /// The study revision and selection the field messages were written under.
    messages_for: (u64, usize),
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
        let (png_tx, png_rx) = channel();
        let mut app = Self {
            doc: Document::new(demo_study()),
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
            sandbox: options.sandbox.and_then(|p| p.canonicalize().ok()),
            chooser: BuiltInChooser::default(),
            fallback_noted: false,
            png_pending: None,
            last_autosave: Instant::now(),
            allow_close: false,
            plot_rects: Vec::new(),
            pending_commands: Vec::new(),
            png_tx,
            png_rx,
            theme_applied: None,
            messages_for: (0, 0),
        };
        if let Some(p) = options.open
            && let Err(e) = app.open_file(&p)
        {
            app.error = Some(e.to_string());
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
        self.doc.study()
    }

    /// Mutable access to the study (an edit like any other: checked when the frame
    /// settles, undoable once committed).
    pub fn study_mut(&mut self) -> &mut Study {
        self.doc.study_mut()
    }

    /// The document (study, file, history, revision).
    pub fn document(&self) -> &Document {
        &self.doc
    }

    /// Index of the selected candidate.
    pub fn selected(&self) -> usize {
        self.selected
    }

    /// Selects a candidate.
    pub fn select(&mut self, i: usize) {
        self.selected = i.min(self.doc.study().candidates.len().saturating_sub(1));
    }

    /// The file the study belongs to.
    pub fn path(&self) -> Option<&Path> {
        self.doc.path()
    }

    /// The error shown in the app, if any.
    pub fn error(&self) -> Option<&str> {
        self.error.as_deref()
    }

    /// Whether there are unsaved changes.
    pub fn is_dirty(&self) -> bool {
        self.doc.is_dirty()
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

    /// The per-frame recompute (cached: only a new revision is evaluated again).
    pub fn results(&mut self, quality: Quality) -> &StudyResults {
        self.enforce_valid();
        self.cache.get(self.doc.study(), self.doc.revision(), quality)
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

    /// Takes in the edits made since the last call (the document's one comparison of
    /// a frame); an edit that breaks a rule is reverted and the reason shown. Returns
    /// the refusal, if any. The app calls this every frame.
    pub fn enforce_valid(&mut self) -> Option<String> {
        let refusal = self.doc.settle()?;
        self.select(self.selected);
        self.error = Some(refusal.clone());
        Some(refusal)
    }

    /// Undoes the latest step.
    pub fn undo(&mut self) {
        self.enforce_valid();
        self.doc.undo();
        self.select(self.selected);
    }

    /// Redoes the latest undone step.
    pub fn redo(&mut self) {
        self.enforce_valid();
        self.doc.redo();
        self.select(self.selected);
    }

    /// Records the current study as an undo step (the app does this whenever no
    /// gesture is in progress).
    pub fn commit_edit(&mut self) {
        self.enforce_valid();
        self.doc.commit_step();
    }

    /// Chooses which file dialog to use (the View menu's setting).
    pub fn set_dialog_preference(&mut self, p: crate::file_chooser::DialogPreference) {
        self.prefs.dialogs = p;
    }

    /// Opens the export window for candidate `i` (the caution must be acknowledged).
    pub fn open_export_dialog_for(&mut self, i: usize) {
        if self.caution_acknowledged {
            self.export = Some(ExportDialog::for_candidate(self.doc.study(), i));
        }
    }

    /// Confirms the export safety caution for this session.
    pub fn acknowledge_caution(&mut self) {
        self.caution_acknowledged = true;
    }

    fn run(&mut self, cmd: Command, ctx: &egui::Context) {
        match cmd {
            Command::New => self.guard(AfterSave::New, ctx),
            Command::Open(p) => self.guard(AfterSave::Open(p), ctx),
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
            Command::ImportWaveform => self.ask_import(),
            Command::ExportCsv(i) => {
                if self.caution_acknowledged {
                    self.open_export_dialog_for(i);
                } else {
                    self.prompt = Some(Prompt::Caution(i));
                }
            }
            Command::Png(which) => self.ask_png(which),
            Command::Figure(q, f) => self.ask_figure(q, f),
        }
    }

    fn answer_prompt(&mut self, answer: PromptAnswer, ctx: &egui::Context) {
        self.prompt = None;
        match answer {
            PromptAnswer::SaveFirst(then) => self.save_or_ask(then, ctx),
            PromptAnswer::Discard(then) => {
                self.doc.discard_changes();
                if let Some(r) = &self.recovery_path {
                    clear_recovery(r);
                }
                self.proceed(then, Some(ctx));
            }
            PromptAnswer::KeepEditing | PromptAnswer::CautionDeclined => {}
            PromptAnswer::Restore(study, origin) => match self.doc.restore(*study, origin) {
                Ok(()) => {
                    self.select(0);
                    self.status = "Restored unsaved work; save it to keep it".into();
                }
                Err(e) => {
                    self.error = Some(format!(
                        "The unsaved work cannot be restored as it is: {}. Its recovery file is kept.",
                        e.user_message()
                    ));
                }
            },
            PromptAnswer::DiscardRecovery => {
                if let Some(r) = &self.recovery_path {
                    clear_recovery(r);
                }
            }
            PromptAnswer::CautionAccepted(i) => {
                self.caution_acknowledged = true;
                self.open_export_dialog_for(i);
            }
        }
    }

    fn dialogs_ui(&mut self, ctx: &egui::Context) {
        if let Some(prompt) = self.prompt.clone()
            && let Some(answer) = prompt_ui(ctx, &prompt, &self.doc.study().name)
        {
            self.answer_prompt(answer, ctx);
        }
        if let Some(mut d) = self.export.take() {
            // The export's checks are on exact results: while a long ramp's exact
            // evaluation runs, the window says so and offers no export yet.
            let results = self.cache.get(self.doc.study(), self.doc.revision(), Quality::SETTLED);
            match export_ui(ctx, &mut d, self.doc.study(), results) {
                Some(ExportAnswer::Closed) => {}
                // The settings travel with the request; the window makes way for the chooser.
                Some(ExportAnswer::ChooseFile(d, name)) => self.ask_export(&d, &name),
                None => self.export = Some(d),
            }
        }
        if let Some(ChooserOutcome::Chosen(purpose, path)) = self.chooser.ui(ctx) {
            self.file_chosen(purpose, path, Some(ctx));
        }
    }

    fn shape_page(&mut self, ui: &mut egui::Ui) {
        let quality = if self.shaping.drag.is_some() { Quality::LIVE } else { Quality::SETTLED };
        self.cache.get(self.doc.study(), self.doc.revision(), quality);
        let Some(results) = self.cache.latest() else { return };
        verdict_ui(ui, self.doc.study(), results, self.selected);
        ui.horizontal(|ui| {
            ui.checkbox(&mut self.shaping.constraints.lock_ends, "keep end points fixed")
                .on_hover_text("End frequencies (and a spline's last knot time) stay put while you drag");
            ui.checkbox(&mut self.shaping.constraints.snap, "snap to grid")
                .on_hover_text("Times to 1/40 of the duration, frequencies to 1 % of the start");
            ui.label("Drag a handle; click to add a spline knot; Ctrl+click or right-click a knot to remove it");
        });
        ui.small(
            "Plots: drag empty space to pan, Ctrl + wheel to zoom, right-drag a box to zoom in, double-click to reset; \
             the wheel alone scrolls the page; right-click a plot to save it as PNG or SVG. Dashed horizontal lines: \
             the lowest and highest stated frequency.",
        );
        let avail = ui.available_height();
        egui::ScrollArea::vertical().id_salt("shape-scroll").show(ui, |ui| {
            let h = (avail * 0.42).clamp(200.0, 420.0);
            let shaped = self.shaping.ui(ui, self.doc.study_mut(), results, self.selected, h);
            if let Some(r) = shaped.rect {
                self.plot_rects.push((Quantity::Omega.title().into(), r));
            }
            if let Some(f) = shaped.save {
                self.pending_commands.push(Command::Figure(Quantity::Omega, f));
            }
            let quantities: Vec<Quantity> = Quantity::DIAGNOSTICS
                .iter()
                .map(|q| if *q == Quantity::LandC && self.shaping.show_coherence { Quantity::Coherence } else { *q })
                .collect();
            let dh = 150.0;
            for pair in quantities.chunks(2) {
                ui.columns(2, |cols| {
                    for (col, q) in cols.iter_mut().zip(pair) {
                        let (r, save) = diagnostic_plot(col, *q, self.doc.study(), results, self.selected, dh);
                        self.plot_rects.push((q.title().into(), r));
                        if let Some(f) = save {
                            self.pending_commands.push(Command::Figure(*q, f));
                        }
                    }
                });
            }
            // Room below the last plots so the status bar never covers their tick labels.
            ui.add_space(32.0);
        });
    }

    fn status_ui(&self, ui: &mut egui::Ui) {
        ui.horizontal(|ui| {
            let file =
                self.doc.path().map_or_else(|| "not saved to a file yet".to_string(), |p| p.display().to_string());
            ui.label(format!("{} — {file}", self.doc.study().name));
            if self.is_dirty() {
                ui.colored_label(ui.visuals().warn_fg_color, "* unsaved changes");
            }
            ui.separator();
            ui.label(format!("recompute {:.2} ms", self.cache.last_seconds * 1e3));
            if self.cache.is_refining() {
                ui.separator();
                ui.label("exact evaluation of a long ramp running…");
            }
            ui.separator();
            ui.label(&self.status);
        });
    }

    fn central_ui(&mut self, ui: &mut egui::Ui) {
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
        if self.page == Page::Shape {
            self.shape_page(ui);
            return;
        }
        let Some(results) = self.cache.latest() else { return };
        let study = self.doc.study_mut();
        match self.page {
            Page::Shape => {}
            Page::Compare => self.compare.ui(ui, study, results, &mut self.selected),
            Page::Cycle => {
                egui::ScrollArea::vertical().id_salt("cycle-scroll").show(ui, |ui| {
                    self.cycle.ui(ui, study, results);
                    ui.add_space(32.0);
                });
            }
            Page::Design => {
                egui::ScrollArea::vertical().id_salt("design-scroll").show(ui, |ui| {
                    self.design.ui(ui, study, results, &mut self.selected);
                    ui.add_space(32.0);
                });
            }
        }
    }
}

impl eframe::App for QuenchlessApp {
    fn logic(&mut self, ctx: &egui::Context, _frame: &mut eframe::Frame) {
        self.cache.set_repaint(ctx);
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
                && let Err(e) = write_recovery(r, self.doc.study(), self.doc.path())
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
        let context = (self.doc.revision(), self.selected);
        if context != self.messages_for {
            crate::widgets::clear_field_errors(&ctx);
            self.messages_for = context;
        }
        crate::widgets::set_display_units(&ctx, self.doc.study().display, self.doc.study().trap.start_frequency_hz);
        let mut commands = shortcuts(&ctx);
        if ctx.input(|i| i.viewport().close_requested()) && !self.allow_close && self.is_dirty() {
            ctx.send_viewport_cmd(ViewportCommand::CancelClose);
            self.prompt = Some(Prompt::Unsaved(AfterSave::Quit));
        }
        self.plot_rects.clear();
        let (can_undo, can_redo) = (self.doc.can_undo(), self.doc.can_redo());
        egui::Panel::top("menu-bar").show(ui, |ui| {
            let mut m = MenuState {
                prefs: &mut self.prefs,
                dimensionless: &mut self.doc.study_mut().display.dimensionless,
                show_coherence: &mut self.shaping.show_coherence,
                page: &mut self.page,
                can_undo,
                can_redo,
                plot_areas: &self.plot_rects,
                selected: self.selected,
            };
            commands.extend(menu_ui(ui, &mut m));
        });
        egui::Panel::bottom("status-line").show(ui, |ui| self.status_ui(ui));
        let quality = if self.shaping.drag.is_some() { Quality::LIVE } else { Quality::SETTLED };
        self.cache.get(self.doc.study(), self.doc.revision(), quality);
        egui::Panel::left("candidates").resizable(true).default_size(330.0).show(ui, |ui| {
            egui::ScrollArea::vertical().id_salt("left-scroll").show(ui, |ui| {
                let Some(results) = self.cache.latest() else { return };
                match self.candidates_panel.ui(ui, self.doc.study_mut(), &mut self.selected, results) {
                    Some(CandidateRequest::ImportWaveform) => commands.push(Command::ImportWaveform),
                    Some(CandidateRequest::Export(i)) => commands.push(Command::ExportCsv(i)),
                    None => {}
                }
            });
        });
        // The central page computes with the study: refuse a bad edit of the list first.
        self.enforce_valid();
        egui::CentralPanel::default().show(ui, |ui| self.central_ui(ui));
        commands.append(&mut self.pending_commands);
        self.take_png(&ctx);
        self.dialogs_ui(&ctx);
        for c in commands {
            self.run(c, &ctx);
        }
        self.enforce_valid();
        self.select(self.selected);
        // One gesture (a drag, a slider) becomes one undo step when the pointer is up.
        if !ctx.input(|i| i.pointer.any_down()) && self.shaping.drag.is_none() {
            self.doc.commit_step();
        }
    }

    fn save(&mut self, storage: &mut dyn eframe::Storage) {
        eframe::set_value(storage, PREFS_KEY, &self.prefs);
    }

    fn on_exit(&mut self, _gl: Option<&eframe::glow::Context>) {
        if let Some(r) = &self.recovery_path {
            if self.is_dirty() && !self.allow_close {
                let _ = write_recovery(r, self.doc.study(), self.doc.path());
            } else {
                clear_recovery(r);
            }
        }
    }
}
