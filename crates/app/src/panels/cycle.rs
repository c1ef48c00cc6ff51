//! The engine-cycle page: two baths and two work strokes, the limit cycle on an
//! energy-frequency diagram, per-cycle figures, and a map of power over two stroke
//! times computed by the physics crate on a worker.

use crate::compute::StudyResults;
use crate::error::AppError;
use crate::units::sci;
use crate::widgets::{Allowed, Kind, value_field};
use crate::worker::{Job, job_ui};
use egui::{Color32, RichText};
use egui_plot::{Legend, Line, MarkerShape, Plot, PlotPoint, PlotPoints, Points, Polygon, Text};
use quenchless_physics::constants::{HBAR, TWO_PI};
use quenchless_physics::cycle::CycleReport;
use quenchless_physics::design::{PowerMap, StrokeTime, power_map};
use quenchless_physics::propagate::PropagationOptions;
use quenchless_physics::state::{bose_einstein, temperature_of_occupation};
use quenchless_profile::study::{BathFilling, BathSpec, CycleSpec, StrokeSpec};
use quenchless_profile::units::Quantity;
use quenchless_profile::{Study, convert};

/// A power map being computed: the one job type, with the physics crate's parallel map.
pub type MapJob = Job<PowerMap>;

/// Starts the power map of the study's cycle on a worker thread.
pub fn start_map(
    study: &Study,
    axes: (StrokeTime, StrokeTime),
    x_range: (f64, f64),
    y_range: (f64, f64),
    cells: usize,
    ctx: Option<egui::Context>,
) -> Result<MapJob, AppError> {
    let Some(spec) = &study.cycle else {
        return Err(AppError::from("power map: the study has no cycle; build one first"));
    };
    if axes.0 == axes.1 {
        return Err(AppError::from(format!(
            "power map: both axes are the {}; choose two different stroke times",
            axes.0.label()
        )));
    }
    for (name, (lo, hi)) in [("x range", x_range), ("y range", y_range)] {
        if !(lo.is_finite() && hi.is_finite() && lo >= 0.0 && hi > lo) {
            return Err(AppError::from(format!(
                "power map {name}: {} to {} is not allowed: need 0 <= from < to",
                sci(lo),
                sci(hi)
            )));
        }
        if hi > crate::interactive::MAX_DURATION_S {
            return Err(AppError::from(format!(
                "power map {name}: to = {} s is not allowed: at most {} s",
                sci(hi),
                sci(crate::interactive::MAX_DURATION_S)
            )));
        }
    }
    let cycle = convert::cycle(study, spec).map_err(|e| format!("power map: {}", e.user_message()))?;
    let n = cells.clamp(2, 200);
    let grid = |(lo, hi): (f64, f64)| (0..n).map(|k| lo + (hi - lo) * k as f64 / (n - 1) as f64).collect::<Vec<f64>>();
    let (xs, ys) = (grid(x_range), grid(y_range));
    Job::start("power-map", n * n, ctx, move |p| {
        // A bounded budget per cell keeps a cancel responsive.
        let opts =
            PropagationOptions { max_steps: 2_000_000, ..PropagationOptions::with_accuracy(1e-8).unwrap_or_default() };
        Ok(power_map(&cycle, axes, &xs, &ys, &opts, &|d| p.set(d), p.cancel_flag())?)
    })
}

/// State of the cycle page.
#[derive(Debug)]
pub struct CyclePanel {
    /// The job in progress.
    pub job: Option<MapJob>,
    /// The latest finished map.
    pub map: Option<PowerMap>,
    /// Map axes.
    pub axes: (StrokeTime, StrokeTime),
    /// Map ranges, s.
    pub x_range: (f64, f64),
    /// Map ranges, s.
    pub y_range: (f64, f64),
    /// Cells per side.
    pub cells: usize,
    /// Last problem starting a map.
    pub error: Option<String>,
    /// The split of most power.
    pub tuning: crate::panels::cycle_tuning::CycleTuningPanel,
}

impl Default for CyclePanel {
    fn default() -> Self {
        Self {
            job: None,
            map: None,
            axes: (StrokeTime::HotContact, StrokeTime::ColdContact),
            x_range: (2e-6, 60e-6),
            y_range: (2e-6, 60e-6),
            cells: 24,
            error: None,
            tuning: crate::panels::cycle_tuning::CycleTuningPanel::default(),
        }
    }
}

impl CyclePanel {
    /// Collects worker messages (call from `App::logic`); never blocks.
    pub fn poll(&mut self) {
        self.tuning.poll();
        if let Some(job) = self.job.as_mut()
            && let Some(r) = job.poll()
        {
            match r {
                Ok(m) => self.map = Some(m),
                Err(e) => self.error = Some(format!("power map: {e}")),
            }
            self.job = None;
        }
    }

    /// Starts a map of the study's cycle.
    pub fn start(&mut self, study: &Study, ctx: Option<egui::Context>) {
        if let Some(j) = &self.job {
            j.cancel();
        }
        match start_map(study, self.axes, self.x_range, self.y_range, self.cells, ctx) {
            Ok(j) => {
                self.job = Some(j);
                self.error = None;
            }
            Err(e) => self.error = Some(e.to_string()),
        }
    }

    /// Draws the page.
    pub fn ui(&mut self, ui: &mut egui::Ui, study: &mut Study, results: &StudyResults) {
        ui.heading("Engine cycle");
        if study.trap.model.as_ref().is_some_and(|m| {
            !m.axes.is_empty() || matches!(m.reference_well, quenchless_profile::study::WellSpec::Tweezer { .. })
        }) {
            ui.label(
                egui::RichText::new(
                    "The cycle runs on the reference axis alone: the trap model's other axes are not part of it yet.",
                )
                .color(ui.visuals().warn_fg_color),
            );
        }
        if study.cycle.is_none() {
            ui.label("This study has no cycle yet.");
            if ui.button("Build a cycle between the trap's end frequencies").clicked() {
                let (h, c) = (
                    study.trap.start_frequency_hz.max(study.trap.end_frequency_hz),
                    study.trap.start_frequency_hz.min(study.trap.end_frequency_hz),
                );
                study.cycle = Some(CycleSpec {
                    hot: BathSpec {
                        frequency_hz: h,
                        filling: BathFilling::Occupation(2.0),
                        rate_per_s: 1e5,
                        time_s: 30e-6,
                    },
                    cold: BathSpec {
                        frequency_hz: c,
                        filling: BathFilling::Occupation(0.2),
                        rate_per_s: 1e5,
                        time_s: 30e-6,
                    },
                    expansion: StrokeSpec::IdealAdiabatic { time_s: 10e-6 },
                    compression: StrokeSpec::IdealAdiabatic { time_s: 10e-6 },
                });
            }
            return;
        }
        ui.columns(2, |cols| {
            cycle_editor(&mut cols[0], study);
            if cols[0].button("Remove the cycle").clicked() {
                study.cycle = None;
            }
            match &results.cycle {
                Some(Ok(r)) => figures_ui(&mut cols[1], r),
                Some(Err(e)) => {
                    cols[1].colored_label(cols[1].visuals().error_fg_color, format!("Warning: {e}"));
                }
                None => {}
            }
        });
        if let Some(Ok(r)) = &results.cycle {
            diagram_ui(ui, r);
        }
        ui.separator();
        self.map_ui(ui, study);
        ui.separator();
        self.tuning.ui(ui, study);
    }

    /// Whether a map or an optimisation is running.
    pub fn busy(&self) -> bool {
        self.job.is_some() || self.tuning.job.is_some()
    }

    fn map_ui(&mut self, ui: &mut egui::Ui, study: &Study) {
        ui.strong("Power over two stroke times (computed in the background)");
        ui.horizontal(|ui| {
            for (label, axis) in [("map x axis", &mut self.axes.0), ("map y axis", &mut self.axes.1)] {
                egui::ComboBox::from_label(label).selected_text(axis.label()).show_ui(ui, |ui| {
                    for a in StrokeTime::ALL {
                        ui.selectable_value(axis, a, a.label());
                    }
                });
            }
        });
        ui.horizontal(|ui| {
            let t = Kind::Unit(Quantity::Time);
            value_field(ui, "x from", &mut self.x_range.0, t, Allowed::NonNegative);
            value_field(ui, "x to", &mut self.x_range.1, t, Allowed::Positive);
            value_field(ui, "y from", &mut self.y_range.0, t, Allowed::NonNegative);
            value_field(ui, "y to", &mut self.y_range.1, t, Allowed::Positive);
        });
        ui.horizontal(|ui| {
            ui.add(egui::Slider::new(&mut self.cells, 4..=60).text("cells per side"));
            if self.job.is_none() && ui.button("Compute power map").clicked() {
                let ctx = ui.ctx().clone();
                self.start(study, Some(ctx));
            }
        });
        job_ui(ui, self.job.as_ref(), "Cancel map");
        if let Some(e) = &self.error {
            ui.colored_label(ui.visuals().error_fg_color, e);
        }
        if let Some(m) = &self.map {
            let found = self.tuning.current(study);
            let mark = found.map(|r| ([r.time_of(m.x_axis) * 1e6, r.time_of(m.y_axis) * 1e6], r.family.name()));
            if let (Some(([x, y], family)), Some(r)) = (mark, found) {
                ui.label(format!(
                    "Pink cross: the split of most power found below ({family} strokes) at {x:.3} µs, {y:.3} µs, \
                     with a total cycle time of {:.3} µs and the other two strokes at that optimum's times.",
                    r.best.total_time * 1e6
                ));
            }
            ui.small(
                "The map varies only these two stroke times, the other two at the study's values: its brightest \
                 cell is the best split of the map, which is a different optimum from the cross whenever the \
                 cross's other strokes or total time differ.",
            );
            map_plot(ui, m, mark);
        }
    }
}

fn stroke_editor(ui: &mut egui::Ui, label: &str, stroke: &mut StrokeSpec, names: &[String]) {
    let current = match stroke {
        StrokeSpec::Candidate(n) => format!("candidate “{n}”"),
        StrokeSpec::Sudden { .. } => "sudden jump + hold".into(),
        StrokeSpec::IdealAdiabatic { .. } => "ideal adiabatic".into(),
        StrokeSpec::Ramp(r) => format!("in-place {} ramp", r.family_label()),
    };
    egui::ComboBox::from_label(label).selected_text(current).show_ui(ui, |ui| {
        if ui.selectable_label(matches!(stroke, StrokeSpec::Sudden { .. }), "sudden jump + hold").clicked() {
            *stroke = StrokeSpec::Sudden { hold_s: 0.0 };
        }
        if ui.selectable_label(matches!(stroke, StrokeSpec::IdealAdiabatic { .. }), "ideal adiabatic").clicked() {
            *stroke = StrokeSpec::IdealAdiabatic { time_s: 10e-6 };
        }
        for n in names {
            if ui
                .selectable_label(matches!(stroke, StrokeSpec::Candidate(c) if c == n), format!("candidate “{n}”"))
                .clicked()
            {
                *stroke = StrokeSpec::Candidate(n.clone());
            }
        }
    });
    let t = Kind::Unit(Quantity::Time);
    match stroke {
        StrokeSpec::Sudden { hold_s } => {
            value_field(ui, &format!("{label} hold"), hold_s, t, Allowed::NonNegative);
        }
        StrokeSpec::IdealAdiabatic { time_s } => {
            value_field(ui, &format!("{label} time"), time_s, t, Allowed::NonNegative);
        }
        _ => {}
    }
}

fn bath_editor(ui: &mut egui::Ui, label: &str, b: &mut BathSpec) {
    ui.strong(label);
    value_field(
        ui,
        &format!("{label} frequency"),
        &mut b.frequency_hz,
        Kind::Unit(Quantity::Frequency),
        Allowed::Positive,
    );
    let mut by_temp = matches!(b.filling, BathFilling::TemperatureK(_));
    if ui
        .checkbox(&mut by_temp, format!("{label}: give a temperature"))
        .on_hover_text("The same bath either way: the occupation and the temperature convert into each other")
        .changed()
    {
        b.filling = converted_filling(b.filling, b.frequency_hz * TWO_PI);
    }
    match &mut b.filling {
        BathFilling::Occupation(n) => {
            value_field(ui, &format!("{label} occupation"), n, Kind::Number, Allowed::NonNegative);
        }
        BathFilling::TemperatureK(t) => {
            value_field(
                ui,
                &format!("{label} temperature"),
                t,
                Kind::Unit(Quantity::Temperature),
                Allowed::NonNegative,
            );
        }
    }
    value_field(ui, &format!("{label} coupling [1/s]"), &mut b.rate_per_s, Kind::Number, Allowed::NonNegative);
    value_field(ui, &format!("{label} contact time"), &mut b.time_s, Kind::Unit(Quantity::Time), Allowed::NonNegative);
}

fn cycle_editor(ui: &mut egui::Ui, study: &mut Study) {
    let names: Vec<String> = study.candidates.iter().map(|c| c.name.clone()).collect();
    let Some(cy) = study.cycle.as_mut() else { return };
    bath_editor(ui, "Hot bath", &mut cy.hot);
    stroke_editor(ui, "Expansion", &mut cy.expansion, &names);
    bath_editor(ui, "Cold bath", &mut cy.cold);
    stroke_editor(ui, "Compression", &mut cy.compression, &names);
}

fn figures_ui(ui: &mut egui::Ui, r: &CycleReport) {
    if !r.stable {
        ui.label(
            RichText::new(format!("UNSTABLE CYCLE: spectral radius ρ = {} ≥ 1", sci(r.spectral_radius)))
                .strong()
                .size(16.0)
                .color(ui.visuals().error_fg_color),
        );
        ui.label("There is no limit cycle: the energy grows from cycle to cycle, so no per-cycle figures exist. Lengthen the bath contacts or slow the strokes.");
        return;
    }
    let Some(f) = &r.figures else { return };
    ui.label(
        RichText::new(format!("Stable limit cycle (ρ = {}), regime: {}", sci(r.spectral_radius), f.regime.name()))
            .strong()
            .size(15.0),
    );
    egui::Grid::new("cycle-figures").striped(true).show(ui, |ui| {
        let row = |ui: &mut egui::Ui, k: &str, v: String| {
            ui.label(k);
            ui.label(v);
            ui.end_row();
        };
        row(ui, "work out per cycle", format!("{} ħω_h", sci(f.work_out_quanta)));
        row(ui, "heat from hot bath", format!("{} ħω_h", sci(f.heat_hot_quanta)));
        row(ui, "heat from cold bath", format!("{} ħω_h", sci(f.heat_cold_quanta)));
        row(ui, "efficiency", f.efficiency.map_or_else(|| "— (not an engine)".into(), sci));
        row(ui, "Otto bound 1 − ω_c/ω_h", sci(r.otto_efficiency));
        if let Some(c) = f.cop {
            row(ui, "coefficient of performance", sci(c));
        }
        row(ui, "power", format!("{} W", sci(f.power_w)));
        row(ui, "cycle time", quenchless_profile::units::format_quantity(r.cycle_time_s, Quantity::Time));
    });
}

fn diagram_ui(ui: &mut egui::Ui, r: &CycleReport) {
    let Some(f) = &r.figures else { return };
    let wh = f.corners[0].omega_rad_s;
    // Energy in units of ħω_h against the trap frequency in kHz.
    let pts: Vec<[f64; 2]> =
        f.corners.iter().map(|c| [c.omega_rad_s / TWO_PI / 1e3, c.energy_quanta * c.omega_rad_s / wh]).collect();
    ui.strong("Limit cycle on the energy–frequency plane (strokes drawn as straight segments between the corners)");
    Plot::new("energy-frequency")
        .allow_scroll(false)
        .x_axis_formatter(crate::units::axis_ticks)
        .y_axis_formatter(crate::units::axis_ticks)
        .height(220.0)
        .legend(Legend::default())
        .x_axis_label("ν [kHz]")
        .y_axis_label("<H> / ħω_h")
        .show(ui, |pui| {
            let seg = |a: usize, b: usize| PlotPoints::new(vec![pts[a], pts[b]]);
            pui.line(Line::new("hot contact", seg(0, 1)).color(Color32::from_rgb(210, 60, 40)).width(2.0));
            pui.line(Line::new("expansion", seg(1, 2)).color(Color32::from_rgb(90, 90, 90)).width(2.0));
            pui.line(Line::new("cold contact", seg(2, 3)).color(Color32::from_rgb(40, 110, 210)).width(2.0));
            pui.line(Line::new("compression", seg(3, 0)).color(Color32::from_rgb(150, 150, 150)).width(2.0));
            pui.points(
                // Unnamed: helper marks stay out of the legend; mid grey reads on both themes.
                Points::new("", pts.clone()).radius(5.0).shape(MarkerShape::Diamond).color(Color32::from_gray(128)),
            );
            for (k, p) in pts.iter().enumerate() {
                pui.text(
                    Text::new("", PlotPoint::new(p[0], p[1]), format!("  {} {}", k + 1, f.corners[k].label))
                        .anchor(egui::Align2::LEFT_BOTTOM),
                );
            }
        });
    let _ = HBAR;
}

fn map_plot(ui: &mut egui::Ui, m: &PowerMap, optimum: Option<([f64; 2], &str)>) {
    let finite: Vec<f64> = m.power_w.iter().filter_map(|p| p.as_ref().ok().copied()).collect();
    let max = finite.iter().fold(0.0_f64, |a, b| a.max(b.abs()));
    let best = m
        .power_w
        .iter()
        .enumerate()
        .filter_map(|(k, p)| p.as_ref().ok().map(|p| (k, *p)))
        .max_by(|a, b| a.1.total_cmp(&b.1));
    let unstable = m.power_w.iter().filter(|p| p.is_err()).count();
    ui.label(format!(
        "Orange: power delivered (engine), blue: work taken in, grey: unstable or not buildable ({unstable} cells). Brightest = {} W.",
        sci(max)
    ));
    if let Some((k, p)) = best {
        let (x, y) = (m.xs[k % m.xs.len()], m.ys[k / m.xs.len()]);
        ui.label(format!(
            "Best: {} W at {} = {}, {} = {}",
            sci(p),
            m.x_axis.label(),
            quenchless_profile::units::format_quantity(x, Quantity::Time),
            m.y_axis.label(),
            quenchless_profile::units::format_quantity(y, Quantity::Time)
        ));
    }
    let us = |t: f64| t * 1e6;
    let (dx, dy) =
        (if m.xs.len() > 1 { m.xs[1] - m.xs[0] } else { 1e-6 }, if m.ys.len() > 1 { m.ys[1] - m.ys[0] } else { 1e-6 });
    Plot::new("power-map")
        .allow_scroll(false)
        .x_axis_formatter(crate::units::axis_ticks)
        .y_axis_formatter(crate::units::axis_ticks)
        .height(260.0)
        .data_aspect(0.0)
        .x_axis_label(format!("{} [µs]", m.x_axis.label()))
        .y_axis_label(format!("{} [µs]", m.y_axis.label()))
        .show(ui, |pui| {
            for (k, p) in m.power_w.iter().enumerate() {
                let (x, y) = (m.xs[k % m.xs.len()], m.ys[k / m.xs.len()]);
                let colour = match p {
                    Err(_) => Color32::from_gray(120),
                    Ok(v) if *v >= 0.0 => {
                        let s = if max > 0.0 { (v / max) as f32 } else { 0.0 };
                        Color32::from_rgb(255, (235.0 - 135.0 * s) as u8, (200.0 - 200.0 * s) as u8)
                    }
                    Ok(v) => {
                        let s = if max > 0.0 { (-v / max) as f32 } else { 0.0 };
                        Color32::from_rgb((220.0 - 180.0 * s) as u8, (230.0 - 120.0 * s) as u8, 255)
                    }
                };
                let (x0, x1, y0, y1) = (us(x - dx / 2.0), us(x + dx / 2.0), us(y - dy / 2.0), us(y + dy / 2.0));
                pui.polygon(
                    Polygon::new("cell", PlotPoints::new(vec![[x0, y0], [x1, y0], [x1, y1], [x0, y1]]))
                        .fill_color(colour)
                        .width(0.0)
                        .allow_hover(false),
                );
            }
            if let Some((p, family)) = optimum {
                pui.points(
                    Points::new(format!("most power ({family} strokes, other strokes at their optimum)"), vec![p])
                        .shape(MarkerShape::Cross)
                        .radius(8.0)
                        .color(Color32::from_rgb(230, 40, 140)),
                );
            }
        });
}

/// The same bath filling given the other way: an occupation n becomes the temperature
/// T = hbar omega / (k_B ln(1 + 1/n)) and back (Bose-Einstein; n = 0 <-> T = 0), so
/// ticking the box never changes the bath. A value the conversion cannot take (a
/// frequency not yet valid) keeps its number in the other form's default instead.
fn converted_filling(filling: BathFilling, omega: f64) -> BathFilling {
    match filling {
        BathFilling::Occupation(n) => BathFilling::TemperatureK(temperature_of_occupation(omega, n).unwrap_or(1e-6)),
        BathFilling::TemperatureK(t) => BathFilling::Occupation(bose_einstein(omega, t).unwrap_or(1.0)),
    }
}
