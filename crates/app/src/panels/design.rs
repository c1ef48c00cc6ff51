//! The "Design & hardware" page: build frictionless ramps on demand, play the selected
//! candidate through the generator, map its robustness to calibration and timing
//! errors and its sensitivity to noise, and optimise a spline's knots. Each section
//! folds away; long jobs run on worker threads with progress and cancel.

use crate::compute::StudyResults;
use crate::panels::noise_map::NoiseMapPanel;
use crate::panels::playback::PlaybackPanel;
use crate::panels::real_wells::RealWellsPanel;
use crate::panels::robustness::RobustnessPanel;
use crate::panels::spline_fit::SplineFitPanel;
use crate::panels::synthesis::SynthesisPanel;
use egui::RichText;
use quenchless_profile::Study;

/// The page's sections, in order.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Section {
    /// Frictionless ramps on demand.
    Synthesis,
    /// The generator's playback.
    Playback,
    /// Robustness map.
    Robustness,
    /// Noise map.
    Noise,
    /// Spline optimiser.
    Spline,
    /// The anharmonic check in the real wells.
    RealWells,
}

/// State of the page.
#[derive(Debug)]
pub struct DesignPanel {
    /// Frictionless ramps on demand.
    pub synthesis: SynthesisPanel,
    /// The generator's playback.
    pub playback: PlaybackPanel,
    /// Robustness to calibration and timing errors.
    pub robustness: RobustnessPanel,
    /// Sensitivity to noise.
    pub noise: NoiseMapPanel,
    /// Spline optimiser.
    pub spline: SplineFitPanel,
    /// The anharmonic check in the real wells.
    pub real_wells: RealWellsPanel,
    /// Which sections are unfolded, indexed by [`Section`].
    pub open: [bool; 6],
}

impl Default for DesignPanel {
    fn default() -> Self {
        Self {
            synthesis: SynthesisPanel::default(),
            playback: PlaybackPanel::default(),
            robustness: RobustnessPanel::default(),
            noise: NoiseMapPanel::default(),
            spline: SplineFitPanel::default(),
            real_wells: RealWellsPanel::default(),
            open: [true, true, true, false, false, false],
        }
    }
}

fn section(ui: &mut egui::Ui, title: &str, subtitle: &str, open: &mut bool, body: impl FnOnce(&mut egui::Ui)) {
    let r = egui::CollapsingHeader::new(RichText::new(title).strong().size(15.0))
        .id_salt(title)
        .open(Some(*open))
        .show(ui, |ui| {
            ui.label(RichText::new(subtitle).italics().weak());
            body(ui);
        });
    if r.header_response.clicked() {
        *open = !*open;
    }
    ui.add_space(4.0);
}

impl DesignPanel {
    /// Collects every worker's result (call from `App::logic`).
    pub fn poll(&mut self) {
        self.playback.poll();
        self.robustness.poll();
        self.noise.poll();
        self.spline.poll();
        self.real_wells.poll();
    }

    /// Whether any job is running.
    pub fn busy(&self) -> bool {
        self.playback.job.is_some()
            || self.robustness.job.is_some()
            || self.noise.job.is_some()
            || self.spline.job.is_some()
            || self.real_wells.job.is_some()
    }

    /// Draws the page, section after section.
    pub fn ui(&mut self, ui: &mut egui::Ui, study: &mut Study, results: &StudyResults, selected: &mut usize) {
        ui.heading("Design & hardware");
        let name = study.candidates.get(*selected).map_or_else(|| "none".to_string(), |c| c.name.clone());
        ui.label(format!("Selected candidate: “{name}” (choose another in the list on the left)."));
        section(
            ui,
            "Synthesis: frictionless ramps on demand",
            "Closed-form designs (constant μ, invariant shortcut, time-optimal holds); the new ramp becomes a candidate of the study.",
            &mut self.open[Section::Synthesis as usize],
            |ui| self.synthesis.ui(ui, study, selected),
        );
        section(
            ui,
            "Playback: the ramp as the generator plays it",
            "Sample-and-hold at the generator's rate, its drive chain, and what rate and resolution the tolerance needs.",
            &mut self.open[Section::Playback as usize],
            |ui| self.playback.ui(ui, study, results, *selected),
        );
        let settings = self.playback.settings.clone();
        section(
            ui,
            "Robustness: calibration and timing errors",
            "Q* of the played ramp when every frequency is off by e and the duration by d.",
            &mut self.open[Section::Robustness as usize],
            |ui| self.robustness.ui(ui, study, *selected, &settings),
        );
        section(
            ui,
            "Noise: dephasing and amplitude noise",
            "The final energy against the adiabatic one, over noise strengths.",
            &mut self.open[Section::Noise as usize],
            |ui| self.noise.ui(ui, study, *selected),
        );
        section(
            ui,
            "Spline optimiser: knots toward Q* = 1",
            "Nelder–Mead on the inner knot frequencies, nominal or robust over a calibration band.",
            &mut self.open[Section::Spline as usize],
            |ui| self.spline.ui(ui, study, selected),
        );
        section(
            ui,
            "Real wells: the anharmonic check",
            "The start state propagated as a wavefunction in each axis's Gaussian, Lorentzian or harmonic well.",
            &mut self.open[Section::RealWells as usize],
            |ui| self.real_wells.ui(ui, study, &results.scale, *selected),
        );
    }
}
