//! Shaping: adding a candidate, typing a value, dragging a knot, undo.

use crate::harness::app_harness;
use egui::{Event, Modifiers, PointerButton};
use egui_kittest::kittest::{NodeT as _, Queryable as _};
use quenchless_app::handles::Handle;
use quenchless_profile::study::RampSpec;

#[test]
fn add_candidate_button_adds_a_ramp() {
    let mut h = app_harness();
    let before = h.state().study().candidates.len();
    h.get_by_label("Add candidate").click();
    h.run_ok();
    let s = h.state().study();
    assert_eq!(s.candidates.len(), before + 1);
    assert_eq!(s.candidates[before].ramp.family_label(), "linear");
    assert_eq!(h.state().selected(), before, "the new candidate is selected");
}

#[test]
fn typing_a_duration_changes_the_ramp_and_the_verdict() {
    let mut h = app_harness();
    // The demo's first candidate is a 20 µs linear ramp.
    h.get_by_label("Duration").focus();
    h.run_ok();
    // Select all, then type the new value and press Enter.
    h.key_press_modifiers(Modifiers::COMMAND, egui::Key::A);
    h.get_by_label("Duration").type_text("200 us");
    h.key_press(egui::Key::Enter);
    h.run_ok();
    let RampSpec::Linear { duration_s, .. } = h.state().study().candidates[0].ramp else {
        panic!("first demo ramp is linear")
    };
    assert!((duration_s - 200e-6).abs() < 1e-15, "duration = {duration_s}");
}

#[test]
fn bad_typed_value_is_refused_with_the_reason() {
    let mut h = app_harness();
    h.get_by_label("From").focus();
    h.run_ok();
    h.key_press_modifiers(Modifiers::COMMAND, egui::Key::A);
    h.run_ok();
    h.get_by_label("From").type_text("-3 kHz");
    h.run_ok();
    h.key_press(egui::Key::Enter);
    h.run_ok();
    let RampSpec::Linear { from_hz, .. } = h.state().study().candidates[0].ramp else { panic!("linear") };
    assert!((from_hz - 120e3).abs() < 1e-9, "the old value stays");
    let shown: Vec<String> = h
        .root()
        .children_recursive()
        .filter_map(|n| n.accesskit_node().label())
        .filter(|l| l.contains("From") || l.contains("kHz"))
        .collect();
    assert!(h.query_by_label_contains("must be > 0").is_some(), "the reason is shown: {shown:?}");
}

fn knot_screen(h: &egui_kittest::Harness<'_, quenchless_app::QuenchlessApp>, k: usize) -> egui::Pos2 {
    h.state().handle_positions().iter().find(|(hd, _)| *hd == Handle::Knot(k)).map(|(_, p)| *p).expect("knot drawn")
}

#[test]
fn dragging_a_knot_changes_ramp_and_verdict_and_undo_restores() {
    let mut h = app_harness();
    // Candidate 2 of the demo is the hand-drawn spline.
    h.state_mut().select(2);
    h.run_ok();
    let before = h.state().study().clone();
    let verdict_before = h.state_mut().results(quenchless_app::Quality::SETTLED).candidates[2]
        .ready()
        .expect("evaluates")
        .evaluation
        .report
        .q_star;
    let p = knot_screen(&h, 2);
    h.hover_at(p);
    h.step();
    h.event(Event::PointerButton { pos: p, button: PointerButton::Primary, pressed: true, modifiers: Modifiers::NONE });
    h.step();
    for k in 1..=8 {
        h.hover_at(p + egui::vec2(0.0, -8.0 * k as f32));
        h.step();
    }
    let during = h.state().study().clone();
    assert_ne!(during, before, "the ramp follows the pointer while dragging");
    h.event(Event::PointerButton {
        pos: p + egui::vec2(0.0, -64.0),
        button: PointerButton::Primary,
        pressed: false,
        modifiers: Modifiers::NONE,
    });
    h.run_ok();
    let after = h.state().study().clone();
    let (RampSpec::Spline { knots: kb, .. }, RampSpec::Spline { knots: ka, .. }) =
        (&before.candidates[2].ramp, &after.candidates[2].ramp)
    else {
        panic!("spline")
    };
    assert!(
        ka[2].frequency_hz > kb[2].frequency_hz + 1e3,
        "knot 3 moved up: {} -> {}",
        kb[2].frequency_hz,
        ka[2].frequency_hz
    );
    assert_eq!(ka[0], kb[0], "other knots unchanged");
    let verdict_after = h.state_mut().results(quenchless_app::Quality::SETTLED).candidates[2]
        .ready()
        .expect("evaluates")
        .evaluation
        .report
        .q_star;
    assert!((verdict_after - verdict_before).abs() > 1e-9, "Q* changed: {verdict_before} -> {verdict_after}");
    // The whole drag is one undo step.
    h.key_press_modifiers(Modifiers::COMMAND, egui::Key::Z);
    h.run_ok();
    assert_eq!(h.state().study(), &before);
    h.key_press_modifiers(Modifiers::COMMAND | Modifiers::SHIFT, egui::Key::Z);
    h.run_ok();
    assert_eq!(h.state().study(), &after, "redo brings the drag back");
}

#[test]
fn click_adds_a_knot_and_ctrl_click_removes_it() {
    let mut h = app_harness();
    h.state_mut().select(2);
    h.run_ok();
    let n = |h: &egui_kittest::Harness<'_, quenchless_app::QuenchlessApp>| match &h.state().study().candidates[2].ramp {
        RampSpec::Spline { knots, .. } => knots.len(),
        _ => 0,
    };
    let n0 = n(&h);
    // Halfway between knots 3 and 4, well above the curve.
    let (a, b) = (knot_screen(&h, 2), knot_screen(&h, 3));
    let p = egui::pos2(0.5 * (a.x + b.x), a.y.min(b.y) - 30.0);
    h.hover_at(p);
    h.step();
    h.event(Event::PointerButton { pos: p, button: PointerButton::Primary, pressed: true, modifiers: Modifiers::NONE });
    h.step();
    h.event(Event::PointerButton {
        pos: p,
        button: PointerButton::Primary,
        pressed: false,
        modifiers: Modifiers::NONE,
    });
    h.run_ok();
    assert_eq!(n(&h), n0 + 1, "a click adds a knot");
    let q = knot_screen(&h, 3);
    h.hover_at(q);
    h.step();
    h.event(Event::ModifiersChanged(Modifiers::COMMAND));
    h.event(Event::PointerButton {
        pos: q,
        button: PointerButton::Primary,
        pressed: true,
        modifiers: Modifiers::COMMAND,
    });
    h.step();
    h.event(Event::PointerButton {
        pos: q,
        button: PointerButton::Primary,
        pressed: false,
        modifiers: Modifiers::COMMAND,
    });
    h.run_ok();
    assert_eq!(n(&h), n0, "Ctrl+click removes it");
}

/// The Compare table names the limit a candidate breaks (the demo's held pair jumps,
/// so it breaks the slew limit: a jump has unbounded slew by the limit's definition)
/// and gives the verdict word beside Q* − 1; the work columns state their one unit.
#[test]
fn compare_names_the_broken_limit_and_one_work_unit() {
    let mut h = app_harness();
    h.get_by_label("Compare candidates").click();
    h.run_ok();
    let study = h.state().study().clone();
    let holds = study.candidates.iter().position(|c| matches!(c.ramp, RampSpec::Holds { .. })).expect("a held ramp");
    let results = h.state_mut().results(quenchless_app::Quality::SETTLED);
    let report = &results.candidates[holds].ready().expect("evaluates").evaluation.report;
    assert!(report.violations.iter().any(|v| v.kind == quenchless_physics::ViolationKind::Slew));
    assert!(h.query_all_by_label_contains("faster than the slew limit").next().is_some(), "the limit is named");
    assert!(h.query_all_by_label_contains("BREAKS LIMITS").next().is_some(), "the verdict word is shown");
    assert!(h.query_by_label("work [ħω of the start trap]").is_some());
    assert!(h.query_all_by_label_contains("stretch(es)").next().is_none());
}

fn type_value(h: &mut egui_kittest::Harness<'_, quenchless_app::QuenchlessApp>, label: &str, text: &str) {
    h.get_by_label(label).focus();
    h.run_ok();
    h.key_press_modifiers(Modifiers::COMMAND, egui::Key::A);
    h.run_ok();
    h.get_by_label(label).type_text(text);
    h.run_ok();
    h.key_press(egui::Key::Enter);
    h.run_ok();
}

/// A refused entry's message lives only as long as the edit it is about: an undo, or
/// selecting another candidate (whose fields share the labels), clears it.
#[test]
fn a_refused_entry_message_is_cleared_by_undo_and_by_another_candidate() {
    let mut h = app_harness();
    type_value(&mut h, "Duration", "80 us");
    let RampSpec::Linear { duration_s, .. } = h.state().study().candidates[0].ramp else { panic!("linear") };
    assert!((duration_s - 80e-6).abs() < 1e-15, "a valid edit to undo");
    type_value(&mut h, "To", "-5 kHz");
    assert!(h.query_by_label_contains("To = -5 kHz is not allowed").is_some(), "the refusal is shown");
    h.key_press_modifiers(Modifiers::COMMAND, egui::Key::Z);
    h.run_ok();
    h.run_ok();
    assert!(h.query_by_label_contains("is not allowed").is_none(), "gone with the undo");
    type_value(&mut h, "To", "-5 kHz");
    assert!(h.query_by_label_contains("To = -5 kHz is not allowed").is_some());
    h.state_mut().select(1);
    h.run_ok();
    h.run_ok();
    assert!(h.query_by_label_contains("is not allowed").is_none(), "not shown under another candidate");
}

/// The mouse wheel over a plot scrolls the page and never pans the plot: a handle
/// keeps its place relative to the shaping plot's frame, and the page moves.
#[test]
fn the_wheel_over_a_plot_scrolls_the_page_not_the_plot() {
    let mut h = app_harness();
    h.run_ok();
    let frame = |h: &egui_kittest::Harness<'_, quenchless_app::QuenchlessApp>| {
        h.state().plot_areas().first().map(|(_, r)| *r).expect("the shaping plot is drawn")
    };
    let handle = |h: &egui_kittest::Harness<'_, quenchless_app::QuenchlessApp>| {
        h.state().handle_positions().first().map(|(_, p)| *p).expect("the selected ramp has handles")
    };
    let (f0, p0) = (frame(&h), handle(&h));
    h.event(Event::PointerMoved(f0.center()));
    h.run_ok();
    for _ in 0..5 {
        h.event(Event::MouseWheel {
            unit: egui::MouseWheelUnit::Point,
            delta: egui::vec2(0.0, -60.0),
            phase: egui::TouchPhase::Move,
            source: egui::MouseWheelSource::Unknown,
            modifiers: Modifiers::NONE,
        });
        h.run_ok();
    }
    h.run_ok();
    let (f1, p1) = (frame(&h), handle(&h));
    let (rel0, rel1) = (p0 - f0.min, p1 - f1.min);
    assert!((rel0 - rel1).length() < 0.5, "the plot panned: handle at {rel0:?} then {rel1:?} in its frame");
    assert!(f1.min.y < f0.min.y - 10.0, "the page scrolled: frame top {} then {}", f0.min.y, f1.min.y);
}

/// Switching to the dimensionless view refits the plot to the new numbers: the start
/// of the demo's expansion (omega/omega_i = 1, its highest point) is drawn near the top
/// of the frame, not squashed at the bottom of the old 0-130 kHz range.
#[test]
fn the_dimensionless_view_refits_the_plot() {
    let mut h = app_harness();
    let top_share = |h: &egui_kittest::Harness<'_, quenchless_app::QuenchlessApp>| {
        let frame = h.state().plot_areas().first().map(|(_, r)| *r).expect("the shaping plot");
        let start = h.state().handle_positions().first().map(|(_, p)| *p).expect("a handle");
        (frame.max.y - start.y) / frame.height()
    };
    assert!(top_share(&h) > 0.7, "in kHz the start is near the top: {}", top_share(&h));
    // Pan the plot a little (as a user does), which ends its automatic fitting.
    let frame = h.state().plot_areas().first().map(|(_, r)| *r).expect("the shaping plot");
    let from = egui::pos2(frame.center().x, frame.max.y - 0.1 * frame.height());
    h.event(Event::PointerMoved(from));
    h.run_ok();
    h.event(Event::PointerButton {
        pos: from,
        button: PointerButton::Primary,
        pressed: true,
        modifiers: Modifiers::NONE,
    });
    for k in 1..=5 {
        h.event(Event::PointerMoved(from + egui::vec2(0.0, -6.0 * k as f32)));
        h.run_ok();
    }
    h.event(Event::PointerButton {
        pos: from + egui::vec2(0.0, -30.0),
        button: PointerButton::Primary,
        pressed: false,
        modifiers: Modifiers::NONE,
    });
    h.run_ok();
    h.get_by_label("Display units").click();
    h.run_ok();
    h.get_by_label("dimensionless view (ω/ω_i, t ω_i)").click();
    h.run_ok();
    h.run_ok();
    assert!(top_share(&h) > 0.7, "after the switch the start is still near the top: {}", top_share(&h));
}

/// The display units apply to the value fields as well as the axes: a 120 kHz start
/// reads "0.12 MHz" in MHz, and any unit still types in (SI prefixes, BIPM 2019).
#[test]
fn display_units_apply_to_the_value_fields() {
    let mut h = app_harness();
    h.state_mut().select(0);
    h.run_ok();
    let shown = |h: &egui_kittest::Harness<'_, quenchless_app::QuenchlessApp>| {
        h.get_by_label("From").accesskit_node().value().unwrap_or_default()
    };
    assert_eq!(shown(&h), "120 kHz");
    h.state_mut().study_mut().display.frequency = quenchless_profile::study::FrequencyUnit::MHz;
    h.state_mut().commit_edit();
    h.run_ok();
    h.run_ok();
    assert_eq!(shown(&h), "0.12 MHz");
}

/// The dimensionless view applies to the value fields: the demo's 20 µs linear ramp
/// from 120 kHz to 30 kHz reads "1 ω_i" and "0.25 ω_i" for its ends and
/// 2π × 120 kHz × 20 µs = 15.079645 /ω_i for its duration; a duration typed as
/// "30 /ω_i" is 30 / (2π × 120 kHz) = 39.788736 µs. The trap's start frequency, which
/// defines ω_i, stays in lab units.
#[test]
fn the_dimensionless_view_applies_to_the_value_fields() {
    let mut h = app_harness();
    h.state_mut().select(0);
    h.state_mut().study_mut().display.dimensionless = true;
    h.state_mut().commit_edit();
    h.run_ok();
    h.run_ok();
    let shown = |h: &egui_kittest::Harness<'_, quenchless_app::QuenchlessApp>, label: &str| {
        h.get_by_label(label).accesskit_node().value().unwrap_or_default()
    };
    assert_eq!(shown(&h, "From"), "1 ω_i");
    assert_eq!(shown(&h, "To"), "0.25 ω_i");
    assert_eq!(shown(&h, "Duration"), "15.079645 /ω_i");
    h.get_by_label("Trap, limits and start state").click();
    h.run_ok();
    assert_eq!(shown(&h, "Trap start"), "120 kHz");
    assert_eq!(shown(&h, "Trap end"), "0.25 ω_i");
    type_value(&mut h, "Duration", "30 /ω_i");
    let RampSpec::Linear { duration_s, .. } = h.state().study().candidates[0].ramp else { panic!("linear") };
    let want = 30.0 / (std::f64::consts::TAU * 120e3);
    assert!((duration_s - want).abs() < 1e-12 * want, "duration = {duration_s}, want {want}");
    // A lab unit still types in, and a bad number before the suffix is refused by name.
    type_value(&mut h, "To", "40 kHz");
    let RampSpec::Linear { to_hz, .. } = h.state().study().candidates[0].ramp else { panic!("linear") };
    assert!((to_hz - 40e3).abs() < 1e-9);
    assert_eq!(shown(&h, "To"), "0.333333 ω_i");
    type_value(&mut h, "To", "abc ω_i");
    assert!(h.query_by_label_contains("expected a number before ω_i").is_some());
}

/// Candidates added by the button or duplicated keep a perceptual distance (OKLab,
/// Ottosson 2020) of at least `MIN_DISTANCE` from every colour in use, the colours a
/// file brought included: the single-ion sample's blue (40, 120, 200) lies close to the
/// palette's first blue, which a new candidate therefore does not take.
#[test]
fn new_and_duplicated_candidates_keep_their_colour_distance() {
    use quenchless_app::colours::{MIN_DISTANCE, distance};
    let mut h = app_harness();
    let sample = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample_profiles/single_ion_engine.ron");
    h.state_mut().open_file(&sample).expect("opens");
    h.run_ok();
    for k in 0..8 {
        if k % 2 == 0 {
            h.get_by_label("Add candidate").click();
        } else {
            h.get_by_label("Duplicate").click();
        }
        h.run_ok();
    }
    let colours: Vec<[u8; 3]> =
        h.state().study().candidates.iter().map(|c| c.colour.expect("every candidate has a colour")).collect();
    assert_eq!(colours.len(), 11);
    for (i, a) in colours.iter().enumerate() {
        for b in &colours[..i] {
            let d = distance(*a, *b);
            assert!(d >= MIN_DISTANCE, "{a:?} and {b:?} are only {d:.3} apart in OKLab");
        }
    }
}
