//! Choosing a file. The system's dialog (through rfd: the desktop portal, else zenity or
//! kdialog) where one can be shown; else a chooser drawn inside the app. rfd answers
//! "nothing chosen" alike for Cancel and for "no dialog could be shown", so whether a
//! system dialog exists is found out here, before relying on it.

use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};
use std::sync::OnceLock;

/// Which file dialog to use (a user setting).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
pub enum DialogPreference {
    /// The system's dialog where one can be shown, else the built-in chooser.
    #[default]
    Automatic,
    /// Always the system's dialog.
    System,
    /// Always the built-in chooser.
    BuiltIn,
}

impl DialogPreference {
    /// Words for the menu.
    pub fn words(self) -> &'static str {
        match self {
            Self::Automatic => "the system's where there is one, else the built-in one",
            Self::System => "always the system's",
            Self::BuiltIn => "always the built-in one",
        }
    }
}

/// What a chosen file is for (carried through the chooser, acted on when chosen).
#[derive(Debug, Clone, PartialEq)]
pub enum FilePurpose {
    /// Open a study.
    OpenStudy,
    /// Save the study to the chosen file; `then_new`/`then_quit` continue an action
    /// that asked for the save first.
    SaveStudy {
        /// What to do once saved.
        then: AfterSave,
    },
    /// Import a waveform as a candidate.
    ImportWaveform,
    /// Export a candidate as played (index, rate, columns, consent to broken limits).
    ExportCsv {
        /// Candidate index.
        candidate: usize,
        /// Sample rate, samples/s.
        rate: f64,
        /// Column layout.
        columns: quenchless_profile::ExportColumns,
        /// Whether broken limits were accepted.
        accept_broken_limits: bool,
    },
    /// Save the window (`None`) or a plot as PNG.
    Png(Option<String>),
    /// Save a plot as a figure (by its title), PNG or SVG by the file's extension.
    Figure(String),
}

/// An action that waited for a save.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum AfterSave {
    /// Nothing more.
    Nothing,
    /// Start a new study.
    New,
    /// Open a study (a given file, or ask for one).
    Open(Option<PathBuf>),
    /// Quit.
    Quit,
}

/// A request for a file.
#[derive(Debug, Clone, PartialEq)]
pub struct FileRequest {
    /// What the file is for.
    pub purpose: FilePurpose,
    /// Window title.
    pub title: String,
    /// A file to write (else one to read).
    pub save: bool,
    /// Name of the file type.
    pub filter_name: &'static str,
    /// Its extensions, without the dot.
    pub extensions: &'static [&'static str],
    /// Suggested file name.
    pub file_name: Option<String>,
    /// Folder to start in.
    pub folder: Option<PathBuf>,
}

/// The system's file dialogs, behind a trait so the app can be tested without them.
pub trait SystemDialogs: std::fmt::Debug + Send + Sync {
    /// `None` when a system dialog can be shown; else why not, in words.
    fn unavailable_reason(&self) -> Option<String>;
    /// Shows the dialog (blocking); `None` for Cancel.
    fn show(&self, request: &FileRequest) -> Option<PathBuf>;
}

/// rfd's dialogs, with a check of what they need first.
#[derive(Debug, Default)]
pub struct RfdDialogs;

impl SystemDialogs for RfdDialogs {
    fn unavailable_reason(&self) -> Option<String> {
        static PROBE: OnceLock<Option<String>> = OnceLock::new();
        PROBE.get_or_init(probe_system_dialogs).clone()
    }

    fn show(&self, r: &FileRequest) -> Option<PathBuf> {
        let mut d = rfd::FileDialog::new().set_title(&r.title).add_filter(r.filter_name, r.extensions);
        if let Some(n) = &r.file_name {
            d = d.set_file_name(n);
        }
        if let Some(f) = &r.folder {
            d = d.set_directory(f);
        }
        if r.save { d.save_file() } else { d.pick_file() }
    }
}

/// No system dialogs at all (tests, or a lab PC without them), with the reason given.
#[derive(Debug, Clone)]
pub struct NoSystemDialogs(pub String);

impl SystemDialogs for NoSystemDialogs {
    fn unavailable_reason(&self) -> Option<String> {
        Some(self.0.clone())
    }
    fn show(&self, _request: &FileRequest) -> Option<PathBuf> {
        None
    }
}

fn on_path(program: &str) -> bool {
    std::env::var_os("PATH").is_some_and(|p| std::env::split_paths(&p).any(|d| d.join(program).is_file()))
}

/// Whether the desktop portal's service is on the session bus (running or startable).
#[cfg(target_os = "linux")]
fn portal_on_session_bus() -> bool {
    const PORTAL: &str = "org.freedesktop.portal.Desktop";
    let Ok(conn) = zbus::blocking::Connection::session() else { return false };
    let Ok(bus) = zbus::blocking::fdo::DBusProxy::new(&conn) else { return false };
    let owned = zbus::names::BusName::try_from(PORTAL).ok().and_then(|n| bus.name_has_owner(n).ok()).unwrap_or(false);
    owned || bus.list_activatable_names().is_ok_and(|names| names.iter().any(|n| n.as_str() == PORTAL))
}

#[cfg(not(target_os = "linux"))]
fn portal_on_session_bus() -> bool {
    true
}

/// Why no system dialog can be shown, or `None` if one can.
fn probe_system_dialogs() -> Option<String> {
    if cfg!(not(target_os = "linux")) || on_path("zenity") || on_path("kdialog") || portal_on_session_bus() {
        return None;
    }
    Some(
        "this desktop offers no file dialog (no desktop portal on the session bus, no zenity or kdialog on PATH)"
            .into(),
    )
}

/// Which dialog a request gets.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum DialogChoice {
    /// The system's.
    System,
    /// The built-in chooser, with the reason when the system's was wanted.
    BuiltIn(Option<String>),
}

/// Decides between the system's dialog and the built-in chooser.
pub fn choose_dialog(preference: DialogPreference, system: Option<&dyn SystemDialogs>) -> DialogChoice {
    match (preference, system) {
        (DialogPreference::BuiltIn, _) | (_, None) => DialogChoice::BuiltIn(None),
        (DialogPreference::System, Some(_)) => DialogChoice::System,
        (DialogPreference::Automatic, Some(s)) => match s.unavailable_reason() {
            None => DialogChoice::System,
            Some(why) => DialogChoice::BuiltIn(Some(why)),
        },
    }
}

/// The chooser drawn inside the app: a folder, its entries, a file name.
#[derive(Debug, Default)]
pub struct BuiltInChooser {
    open: Option<Browsing>,
}

#[derive(Debug)]
struct Browsing {
    request: FileRequest,
    folder: String,
    name: String,
    /// The folder last listed and its entries (name, is a folder) or why not.
    listed: Option<(String, Listing)>,
    error: Option<String>,
    confirm_replace: Option<PathBuf>,
    places: Vec<PathBuf>,
}

/// A folder's entries (name, whether it is a folder), or why it cannot be listed.
type Listing = Result<Vec<(String, bool)>, String>;

/// What the chooser gave back.
#[derive(Debug, Clone, PartialEq)]
pub enum ChooserOutcome {
    /// A file for this purpose.
    Chosen(FilePurpose, PathBuf),
    /// The user closed it.
    Cancelled,
}

fn list_folder(folder: &Path, extensions: &[&str]) -> Listing {
    let mut out = Vec::new();
    for entry in std::fs::read_dir(folder).map_err(|e| format!("{}: {e}", folder.display()))? {
        let Ok(entry) = entry else { continue };
        let name = entry.file_name().to_string_lossy().into_owned();
        if name.starts_with('.') {
            continue;
        }
        let is_dir = entry.file_type().is_ok_and(|t| t.is_dir());
        let matches = Path::new(&name).extension().and_then(|e| e.to_str()).is_some_and(|e| extensions.contains(&e));
        if is_dir || matches {
            out.push((name, is_dir));
        }
    }
    out.sort_by(|a, b| b.1.cmp(&a.1).then_with(|| a.0.to_lowercase().cmp(&b.0.to_lowercase())));
    Ok(out)
}

impl BuiltInChooser {
    /// Whether it is showing.
    pub fn is_open(&self) -> bool {
        self.open.is_some()
    }

    /// Opens it for a request; `recent` (recent files) gives the quick places.
    pub fn open(&mut self, request: FileRequest, recent: &[PathBuf]) {
        let home = std::env::var_os("HOME").map(PathBuf::from);
        let cwd = std::env::current_dir().ok();
        let start = request
            .folder
            .clone()
            .or_else(|| recent.first().and_then(|p| p.parent().map(Path::to_path_buf)))
            .or_else(|| cwd.clone())
            .or_else(|| home.clone())
            .unwrap_or_else(|| PathBuf::from("/"));
        let mut places: Vec<PathBuf> = Vec::new();
        for p in recent.iter().filter_map(|p| p.parent().map(Path::to_path_buf)).chain(cwd).chain(home) {
            if !p.as_os_str().is_empty() && !places.contains(&p) {
                places.push(p);
            }
        }
        let name = request.file_name.clone().unwrap_or_default();
        self.open = Some(Browsing {
            folder: start.display().to_string(),
            name,
            listed: None,
            error: None,
            confirm_replace: None,
            places,
            request,
        });
    }

    /// Draws the chooser window; returns the outcome when the user is done.
    pub fn ui(&mut self, ctx: &egui::Context) -> Option<ChooserOutcome> {
        let b = self.open.as_mut()?;
        let mut outcome = None;
        let mut window_open = true;
        egui::Window::new(&b.request.title)
            .id(egui::Id::unique("built-in-file-chooser"))
            // Above the window that asked for it (the export window, a prompt).
            .order(egui::Order::Foreground)
            .open(&mut window_open)
            .collapsible(false)
            .default_width(520.0)
            .show(ctx, |ui| outcome = b.body(ui));
        if !window_open {
            outcome = Some(ChooserOutcome::Cancelled);
        }
        if outcome.is_some() {
            self.open = None;
        }
        outcome
    }
}

impl Browsing {
    fn body(&mut self, ui: &mut egui::Ui) -> Option<ChooserOutcome> {
        let mut outcome = None;
        ui.horizontal(|ui| {
            let l = ui.label("Folder");
            ui.add(egui::TextEdit::singleline(&mut self.folder).desired_width(380.0)).labelled_by(l.id);
            if ui.button("Up one folder").clicked()
                && let Some(parent) = Path::new(&self.folder).parent()
            {
                self.folder = parent.display().to_string();
            }
        });
        if !self.places.is_empty() {
            ui.horizontal_wrapped(|ui| {
                ui.label("Recent folders:");
                for p in self.places.clone() {
                    if ui.small_button(p.display().to_string()).clicked() {
                        self.folder = p.display().to_string();
                    }
                }
            });
        }
        if self.listed.as_ref().is_none_or(|(f, _)| *f != self.folder) {
            self.listed = Some((self.folder.clone(), list_folder(Path::new(&self.folder), self.request.extensions)));
        }
        let mut enter = None;
        egui::Frame::group(ui.style()).show(ui, |ui| {
            egui::ScrollArea::vertical().id_salt("chooser-entries").max_height(220.0).show(ui, |ui| {
                match self.listed.as_ref().map(|(_, l)| l) {
                    Some(Ok(entries)) if entries.is_empty() => {
                        ui.label(format!("(no folders or {} files here)", self.request.filter_name));
                    }
                    Some(Ok(entries)) => {
                        for (name, is_dir) in entries {
                            let text = if *is_dir { format!("{name}/") } else { name.clone() };
                            if ui.selectable_label(!is_dir && *name == self.name, text).clicked() {
                                if *is_dir {
                                    enter = Some(name.clone());
                                } else {
                                    self.name.clone_from(name);
                                    self.confirm_replace = None;
                                }
                            }
                        }
                    }
                    Some(Err(e)) => {
                        ui.colored_label(ui.visuals().error_fg_color, format!("Cannot list this folder: {e}"));
                    }
                    None => {}
                }
            });
        });
        if let Some(d) = enter {
            self.folder = Path::new(&self.folder).join(d).display().to_string();
        }
        ui.horizontal(|ui| {
            let l = ui.label("File name");
            ui.add(egui::TextEdit::singleline(&mut self.name).desired_width(300.0)).labelled_by(l.id);
            ui.label(format!(
                "({})",
                self.request.extensions.iter().map(|e| format!(".{e}")).collect::<Vec<_>>().join(", ")
            ));
        });
        if let Some(e) = &self.error {
            ui.colored_label(ui.visuals().error_fg_color, e);
        }
        ui.horizontal(|ui| {
            let action = if self.request.save { "Save here" } else { "Open this file" };
            if ui.button(action).clicked() {
                outcome = self.confirm();
            }
            if ui.button("Cancel").clicked() {
                outcome = Some(ChooserOutcome::Cancelled);
            }
        });
        outcome
    }

    /// Checks the folder and name; a file to write that exists needs a second press.
    fn confirm(&mut self) -> Option<ChooserOutcome> {
        let folder = PathBuf::from(self.folder.trim());
        let name = self.name.trim();
        if name.is_empty() {
            self.error = Some("Type a file name (or pick one in the list).".into());
            return None;
        }
        if !folder.is_dir() {
            self.error = Some(format!("{}: no such folder", folder.display()));
            return None;
        }
        let mut path = folder.join(name);
        if self.request.save
            && path.extension().is_none()
            && let Some(ext) = self.request.extensions.first()
        {
            path.set_extension(ext);
        }
        if self.request.save {
            if path.is_file() && self.confirm_replace.as_ref() != Some(&path) {
                self.error = Some(format!("{} exists: press “Save here” again to replace it.", path.display()));
                self.confirm_replace = Some(path);
                return None;
            }
        } else if !path.is_file() {
            self.error = Some(format!("{}: no such file", path.display()));
            return None;
        }
        Some(ChooserOutcome::Chosen(self.request.purpose.clone(), path))
    }
}
