//! The shaping plot of omega(t) with draggable knots and handles, and the stack of
//! diagnostic plots that share its time axis.

use crate::compute::{CandidateSeries, Curve, StudyResults};
use crate::handles::{Constraints, Handle, add_knot, handles, move_handle, remove_knot};
use crate::widgets::colour_of;
use egui::{Color32, Id, Pos2, Vec2b};
use egui_plot::{HLine, Legend, Line, LineStyle, MarkerShape, Plot, PlotPoints, Points, Span};
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::limits::ViolationKind;
use quenchless_profile::Study;

/// Screen distance within which a press grabs a handle, points.
pub const GRAB_RADIUS: f32 = 9.0;

/// The file format a plot is saved in (drawn from the data by the figure layer).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FigureFormat {
    /// A PNG raster, 1200 x 600 pixels.
    Png,
    /// An SVG drawing.
    Svg,
}

impl FigureFormat {
    /// The file extension.
    pub fn extension(self) -> &'static str {
        match self {
            Self::Png => "png",
            Self::Svg => "svg",
        }
    }
}

/// The two "save this plot" entries of a plot's context menu; the chosen format.
fn save_entries(ui: &mut egui::Ui) -> Option<FigureFormat> {
    let mut chosen = None;
    for (label, f) in [("Save this plot as PNG…", FigureFormat::Png), ("Save this plot as SVG…", FigureFormat::Svg)]
    {
        if ui.button(label).clicked() {
            chosen = Some(f);
            ui.close();
        }
    }
    chosen
}

/// What the shaping plot drew and asks for.
#[derive(Debug, Clone, Copy, PartialEq)]
#[must_use]
pub struct ShapeOutcome {
    /// Its screen rect, when drawn.
    pub rect: Option<egui::Rect>,
    /// A request to save it as a figure.
    pub save: Option<FigureFormat>,
}

/// A diagnostic quantity with a plot of its own.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Quantity {
    /// omega(t) (the shaping plot).
    Omega,
    /// Energy in quanta.
    Energy,
    /// L and C in quanta.
    LandC,
    /// Coherence ratio.
    Coherence,
    /// Casimir drift.
    CasimirDrift,
    /// Friction energy.
    Friction,
    /// mu(t).
    Mu,
    /// Instantaneous power.
    Power,
    /// Second moments.
    Moments,
}

impl Quantity {
    /// Every quantity with a plot.
    pub const ALL: [Self; 9] = [
        Self::Omega,
        Self::Energy,
        Self::LandC,
        Self::Coherence,
        Self::CasimirDrift,
        Self::Friction,
        Self::Mu,
        Self::Power,
        Self::Moments,
    ];

    /// The diagnostic plots in display order.
    pub const DIAGNOSTICS: [Self; 7] =
        [Self::Energy, Self::LandC, Self::Friction, Self::Mu, Self::Power, Self::CasimirDrift, Self::Moments];

    /// Title of the plot.
    pub fn title(self) -> &'static str {
        match self {
            Self::Omega => "Trap frequency",
            Self::Energy => "Energy <H>/ħω",
            Self::LandC => "L/ħω (solid) and C/ħω (dashed)",
            Self::Coherence => "Coherence ratio √(L²+C²)/H",
            Self::CasimirDrift => "Casimir drift |K/K₀ − 1|",
            Self::Friction => "Friction energy (quanta)",
            Self::Mu => "Adiabatic parameter μ = (dω/dt)/ω²",
            Self::Power => "Power dH/dt",
            Self::Moments => "Second moments <Q²>ω_i/ħ (solid), <P²>/ħω_i (dashed)",
        }
    }

    /// The curves of a candidate for this plot: (curve, dashed).
    pub fn curves(self, s: &CandidateSeries) -> Vec<(&Curve, bool)> {
        match self {
            Self::Omega => vec![(&s.omega, false), (&s.inverted, true)],
            Self::Energy => vec![(&s.energy, false)],
            Self::LandC => vec![(&s.l, false), (&s.c, true)],
            Self::Coherence => vec![(&s.coherence, false)],
            Self::CasimirDrift => vec![(&s.casimir_drift, false)],
            Self::Friction => vec![(&s.friction, false)],
            Self::Mu => vec![(&s.mu, false)],
            Self::Power => vec![(&s.power, false)],
            Self::Moments => vec![(&s.x_moment, false), (&s.y_moment, true)],
        }
    }

    /// y-axis label.
    pub fn y_label(self, results: &StudyResults) -> String {
        match self {
            Self::Omega => format!("{} (dashed: inverted, signed)", results.scale.y_label()),
            Self::Power if results.scale.dimensionless => "ħω_i²".into(),
            Self::Power => format!("ħω_i per {}", results.scale.time_unit),
            _ => String::new(),
        }
    }
}

/// The group that links every time plot's x axis and cursor.
pub fn time_group() -> Id {
    Id::unique("quenchless-shared-time-axis")
}

/// A drag in progress.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ActiveDrag {
    /// Candidate being shaped.
    pub candidate: usize,
    /// The handle held.
    pub handle: Handle,
    /// Handle position minus press position, screen points.
    pub grab_offset: egui::Vec2,
}

/// State of the shaping plot.
#[derive(Debug, Default)]
pub struct ShapingPanel {
    /// Drag constraints.
    pub constraints: Constraints,
    /// The drag in progress.
    pub drag: Option<ActiveDrag>,
    /// Handles of the selected candidate on screen, as last drawn.
    pub handle_positions: Vec<(Handle, Pos2)>,
    /// Knot the context menu was opened on.
    context_knot: Option<usize>,
    /// Show the coherence ratio instead of L and C.
    pub show_coherence: bool,
}

/// What happened on the shaping plot this frame.
enum ShapeAction {
    None,
    StartDrag(Handle, egui::Vec2),
    Move(Handle, f64, f64),
    EndDrag,
    AddKnot(f64, f64),
    RemoveKnot(usize),
    Context(Option<usize>),
}

fn nearest(handles: &[(Handle, Pos2)], p: Pos2) -> Option<(Handle, Pos2)> {
    handles
        .iter()
        .copied()
        .filter(|(_, q)| q.distance(p) <= GRAB_RADIUS)
        .min_by(|a, b| a.1.distance(p).total_cmp(&b.1.distance(p)))
}

fn add_curves<'a>(
    pui: &mut egui_plot::PlotUi<'a>,
    name: &str,
    colour: Color32,
    width: f32,
    curves: Vec<(&'a Curve, bool)>,
) {
    for (curve, dashed) in curves {
        for piece in curve {
            let mut line = Line::new(name, PlotPoints::Borrowed(piece)).color(colour).width(width);
            if dashed {
                line = line.style(LineStyle::dashed_dense());
            }
            pui.line(line);
        }
    }
}

fn shade_violations(pui: &mut egui_plot::PlotUi<'_>, study: &Study, results: &StudyResults, selected: usize) {
    let Some(Some(o)) =
        (selected < study.candidates.len()).then(|| results.candidates.get(selected).and_then(|r| r.ready()))
    else {
        return;
    };
    for v in &o.evaluation.report.violations {
        let (name, fill) = match v.kind {
            ViolationKind::Inverted => ("ω² ≤ 0 (inverted trap)", Color32::from_rgba_unmultiplied(220, 40, 40, 46)),
            _ => ("breaks a stated limit", Color32::from_rgba_unmultiplied(240, 160, 0, 46)),
        };
        // A stretch a single sample wide still gets a visible band.
        let (a, b) = (results.scale.x(v.start), results.scale.x(v.end));
        let w = (b - a).max(1e-3 * results.scale.x(o.evaluation.report.duration_s));
        pui.span(Span::new(name, a..=a + w).fill(fill));
    }
}

impl ShapingPanel {
    /// Draws the shaping plot and applies a drag or click to the study.
    #[expect(
        clippy::too_many_lines,
        reason = "one plot closure: hit-testing, drawing and the gesture state machine belong together"
    )]
    pub fn ui(
        &mut self,
        ui: &mut egui::Ui,
        study: &mut Study,
        results: &StudyResults,
        selected: usize,
        height: f32,
    ) -> ShapeOutcome {
        let scale = results.scale;
        let hover = ui.ctx().pointer_hover_pos();
        let hovering = hover.is_some_and(|p| nearest(&self.handle_positions, p).is_some());
        let dragging = self.drag.is_some();
        let spec_handles = study.candidates.get(selected).map(|c| handles(&c.ramp, &scale)).unwrap_or_default();
        let prev_handles = self.handle_positions.clone();
        let drag = self.drag;
        let study_ref: &Study = study;
        let mut plot = Plot::new("shaping-plot");
        if rescaled(ui, "shaping-plot", &scale) {
            plot = plot.reset();
        }
        let resp = plot
            .allow_scroll(false)
            .x_axis_formatter(crate::units::axis_ticks)
            .y_axis_formatter(crate::units::axis_ticks)
            .height(height)
            .legend(Legend::default())
            .label_formatter(readout(scale.x_label(), Quantity::Omega.y_label(results)))
            .x_axis_label(scale.x_label())
            .y_axis_label(Quantity::Omega.y_label(results))
            .link_axis(time_group(), Vec2b::new(true, false))
            .link_cursor(time_group(), Vec2b::new(true, false))
            .allow_drag(!(hovering || dragging))
            .allow_double_click_reset(true)
            .show(ui, |pui| {
                shade_violations(pui, study_ref, results, selected);
                let t = &study_ref.trap;
                // Helper lines stay out of the legend (the hint above the plot names them).
                for (lim, [r, g, b]) in [
                    (t.lowest_frequency_hz, crate::colours::LOWEST_BOUND),
                    (t.highest_frequency_hz, crate::colours::HIGHEST_BOUND),
                ] {
                    if let Some(hz) = lim {
                        pui.hline(
                            HLine::new("", scale.y(TWO_PI * hz))
                                .color(Color32::from_rgb(r, g, b))
                                .style(LineStyle::dashed_loose()),
                        );
                    }
                }
                for (i, (c, r)) in study_ref.candidates.iter().zip(&results.candidates).enumerate() {
                    if let Some(series) = r.series()
                        && (c.visible || i == selected)
                    {
                        let w = if i == selected { 2.5 } else { 1.2 };
                        add_curves(pui, &c.name, colour_of(study_ref, i), w, Quantity::Omega.curves(series));
                    }
                }
                let pts: Vec<[f64; 2]> = spec_handles.iter().map(|(_, p)| *p).collect();
                if !pts.is_empty() {
                    pui.points(
                        // Unnamed: the drag handles are not a series of the legend.
                        Points::new("", pts)
                            .shape(MarkerShape::Circle)
                            .radius(5.0)
                            .filled(true)
                            .color(colour_of(study_ref, selected)),
                    );
                }
                let screen: Vec<(Handle, Pos2)> = spec_handles
                    .iter()
                    .map(|(h, p)| (*h, pui.screen_from_plot(egui_plot::PlotPoint::new(p[0], p[1]))))
                    .collect();
                let r = pui.response().clone();
                let mut action = ShapeAction::None;
                if r.drag_started() {
                    if let Some(origin) = r.interact_pointer_pos().and(ui_press_origin(&r))
                        && let Some((h, hp)) = nearest(&screen, origin).or_else(|| nearest(&prev_handles, origin))
                    {
                        action = ShapeAction::StartDrag(h, hp - origin);
                    }
                } else if r.drag_stopped() && drag.is_some() {
                    action = ShapeAction::EndDrag;
                } else if let (Some(d), true) = (drag, r.dragged()) {
                    if let Some(p) = r.interact_pointer_pos() {
                        let q = pui.plot_from_screen(p + d.grab_offset);
                        action = ShapeAction::Move(d.handle, q.x, q.y);
                    }
                } else if r.clicked() {
                    if let Some(p) = r.interact_pointer_pos() {
                        let modifier = r.ctx.input(|i| i.modifiers.command || i.modifiers.ctrl || i.modifiers.shift);
                        match (nearest(&screen, p), modifier) {
                            (Some((Handle::Knot(k), _)), true) => action = ShapeAction::RemoveKnot(k),
                            (None, false) => {
                                let q = pui.plot_from_screen(p);
                                action = ShapeAction::AddKnot(q.x, q.y);
                            }
                            _ => {}
                        }
                    }
                } else if r.secondary_clicked() {
                    let k = r.interact_pointer_pos().and_then(|p| nearest(&screen, p)).and_then(|(h, _)| match h {
                        Handle::Knot(k) => Some(k),
                        _ => None,
                    });
                    action = ShapeAction::Context(k);
                }
                (action, screen)
            });
        let (action, screen) = resp.inner;
        self.handle_positions = screen;
        let start_hz = study.trap.start_frequency_hz;
        match action {
            ShapeAction::StartDrag(handle, grab_offset) => {
                self.drag = Some(ActiveDrag { candidate: selected, handle, grab_offset });
            }
            ShapeAction::Move(h, x, y) => {
                if let Some(c) = study.candidates.get_mut(selected) {
                    move_handle(&mut c.ramp, h, x, y, &scale, self.constraints, start_hz);
                }
                ui.ctx().request_repaint();
            }
            ShapeAction::EndDrag => self.drag = None,
            ShapeAction::AddKnot(x, y) => {
                if let Some(c) = study.candidates.get_mut(selected) {
                    add_knot(&mut c.ramp, x, y, &scale);
                }
            }
            ShapeAction::RemoveKnot(k) => {
                if let Some(c) = study.candidates.get_mut(selected) {
                    remove_knot(&mut c.ramp, k);
                }
            }
            ShapeAction::Context(k) => self.context_knot = k,
            ShapeAction::None => {}
        }
        if !resp.response.dragged() && self.drag.is_some() && !ui.ctx().input(|i| i.pointer.any_down()) {
            self.drag = None;
        }
        let knot = self.context_knot;
        let mut save = None;
        resp.response.context_menu(|ui| {
            if let Some(k) = knot {
                if ui.button(format!("Remove knot {}", k + 1)).clicked() {
                    if let Some(c) = study.candidates.get_mut(selected) {
                        remove_knot(&mut c.ramp, k);
                    }
                    ui.close();
                }
            } else {
                ui.label("Right-click a knot to remove it");
            }
            ui.separator();
            save = save_entries(ui);
        });
        ShapeOutcome { rect: Some(resp.response.rect), save }
    }
}

fn ui_press_origin(r: &egui::Response) -> Option<Pos2> {
    r.ctx.input(|i| i.pointer.press_origin())
}

/// Draws one diagnostic plot of every visible candidate; returns its screen rect and a
/// request to save it as a figure (from its context menu).
pub fn diagnostic_plot(
    ui: &mut egui::Ui,
    q: Quantity,
    study: &Study,
    results: &StudyResults,
    selected: usize,
    height: f32,
) -> (egui::Rect, Option<FigureFormat>) {
    ui.label(egui::RichText::new(q.title()).strong());
    let (x_label, y_label) = (results.scale.x_label(), q.y_label(results));
    let mut plot = Plot::new(("diagnostic", q as u8));
    if rescaled(ui, ("diagnostic", q as u8), &results.scale) {
        plot = plot.reset();
    }
    let resp = plot
        .allow_scroll(false)
        .x_grid_spacer(crate::units::few_ticks)
        .y_grid_spacer(crate::units::few_ticks)
        .x_axis_formatter(crate::units::axis_ticks)
        .y_axis_formatter(crate::units::axis_ticks)
        .height(height)
        .label_formatter(readout(x_label.clone(), y_label.clone()))
        .x_axis_label(x_label)
        .y_axis_label(y_label)
        .link_axis(time_group(), Vec2b::new(true, false))
        .link_cursor(time_group(), Vec2b::new(true, false))
        .show(ui, |pui| {
            shade_violations(pui, study, results, selected);
            for (i, (c, r)) in study.candidates.iter().zip(&results.candidates).enumerate() {
                if let Some(series) = r.series()
                    && (c.visible || i == selected)
                {
                    let w = if i == selected { 2.2 } else { 1.1 };
                    add_curves(pui, &c.name, colour_of(study, i), w, q.curves(series));
                }
            }
        });
    let mut save = None;
    resp.response.context_menu(|ui| save = save_entries(ui));
    (resp.response.rect, save)
}

/// The hover readout of a plot: the series, then both coordinates with their axis
/// labels (which carry the units), e.g. "linear / t [µs] = 12.5 / ν [kHz] = 48.3".
/// Unnamed helper series get no readout.
fn readout(x_label: String, y_label: String) -> impl Fn(&egui_plot::HoverPosition<'_>) -> Option<String> {
    move |pos| match pos {
        egui_plot::HoverPosition::NearDataPoint { plot_name, position, .. } if !plot_name.is_empty() => Some(format!(
            "{plot_name}\n{x_label} = {}\n{y_label} = {}",
            crate::units::sci(position.x),
            crate::units::sci(position.y)
        )),
        _ => None,
    }
}

/// Whether the display scale (dimensionless view, time or frequency unit) changed since
/// this plot was last drawn: then the plot forgets its zoom and fits the data in the new
/// units instead of keeping the old axis range.
fn rescaled(ui: &egui::Ui, plot: impl std::hash::Hash + std::fmt::Debug, scale: &crate::units::DisplayScale) -> bool {
    let id = egui::Id::unique("plot-scale").with(plot);
    let key = (scale.dimensionless, scale.time_unit, scale.frequency_unit);
    let before: Option<(bool, &'static str, &'static str)> = ui.data(|d| d.get_temp(id));
    ui.data_mut(|d| d.insert_temp(id, key));
    before.is_some_and(|b| b != key)
}
