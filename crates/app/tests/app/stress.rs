//! Random interactions on the real app: clicks on every reachable widget, drags on the
//! plots (far outside them too), key presses and shortcuts, and hostile values typed
//! into every field. After every step the study must still validate, no shown figure
//! may be NaN or infinite, and nothing may panic.
//!
//! Seeded and replayable: `QUENCHLESS_STRESS_SEED` picks the seed (default below),
//! `QUENCHLESS_STRESS_STEPS` the number of steps. A failure prints both and the last
//! actions.

use crate::harness::app_harness_with;
use egui::accesskit::Role;
use egui::{Event, Key, Modifiers, PointerButton, Pos2, Rect, pos2, vec2};
use egui_kittest::Harness;
use egui_kittest::kittest::NodeT as _;
use quenchless_app::AppOptions;
use quenchless_app::{Quality, QuenchlessApp};
use std::collections::VecDeque;
use std::panic::{AssertUnwindSafe, catch_unwind, resume_unwind};

/// Steps of a default run: about 20 s in a debug test build on a free core (measured).
const DEFAULT_STEPS: usize = 1500;
/// Seed of a default run.
const DEFAULT_SEED: u64 = 0x005E_ED0F_0DD5;
/// Size of the harness window, points.
const WINDOW: egui::Vec2 = vec2(1400.0, 1000.0);

/// xorshift64* (Marsaglia 2003; the multiplier from Vigna 2016): small and deterministic.
struct Rng(u64);

impl Rng {
    fn new(seed: u64) -> Self {
        Self(seed.max(1))
    }

    fn next(&mut self) -> u64 {
        let mut x = self.0;
        x ^= x >> 12;
        x ^= x << 25;
        x ^= x >> 27;
        self.0 = x;
        x.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }

    fn below(&mut self, n: usize) -> usize {
        if n == 0 { 0 } else { (self.next() % n as u64) as usize }
    }

    fn unit(&mut self) -> f32 {
        (self.next() >> 40) as f32 / (1u64 << 24) as f32
    }

    fn chance(&mut self, p: f32) -> bool {
        self.unit() < p
    }

    fn pick<'a, T>(&mut self, xs: &'a [T]) -> &'a T {
        &xs[self.below(xs.len())]
    }
}

/// Hostile and ordinary entries for value fields.
fn values() -> Vec<String> {
    let mut v: Vec<String> = [
        "0",
        "-1",
        "1",
        "1e300",
        "-1e300",
        "NaN",
        "nan",
        "inf",
        "-inf",
        "",
        " ",
        "garbage",
        "1e-300",
        "5e-324",
        "0.5",
        "2",
        "3 kHz",
        "-3 kHz",
        "1e300 kHz",
        "0 Hz",
        "NaN kHz",
        "12 us",
        "0 us",
        "-5 us",
        "1e300 s",
        "1e-300 s",
        "40 µs",
        "1 ns",
        "2 MHz",
        "100",
        "1e9",
        "0.999",
        "1.5",
        "-0.0",
        "1e12 Hz",
        "7 mK",
        "3 uK",
        "kHz",
        "1 2 3",
        "١٢",
        "🦀",
        "1e",
        "--1",
        "0x10",
    ]
    .iter()
    .map(ToString::to_string)
    .collect();
    v.push("9".repeat(400));
    v.push("x".repeat(3000));
    v.push(format!("{} kHz", "1".repeat(320)));
    v
}

/// A widget found in the accessibility tree.
#[derive(Debug, Clone)]
struct Widget {
    role: Role,
    label: String,
    rect: Rect,
}

fn widgets(h: &Harness<'_, QuenchlessApp>) -> Vec<Widget> {
    let screen = Rect::from_min_size(Pos2::ZERO, WINDOW);
    h.root()
        .children_recursive()
        .filter_map(|n| {
            let a = n.accesskit_node();
            let role = a.role();
            a.bounding_box()?;
            let rect = n.rect();
            (rect.is_positive() && screen.contains(rect.center())).then(|| Widget {
                role,
                label: a.label().unwrap_or_default(),
                rect,
            })
        })
        .collect()
}

const CLICKABLE: [Role; 7] =
    [Role::Button, Role::CheckBox, Role::ComboBox, Role::RadioButton, Role::Tab, Role::MenuItem, Role::Link];

fn click_at(h: &Harness<'_, QuenchlessApp>, p: Pos2, button: PointerButton, modifiers: Modifiers) {
    h.hover_at(p);
    if modifiers != Modifiers::NONE {
        h.event(Event::ModifiersChanged(modifiers));
    }
    for pressed in [true, false] {
        h.event(Event::PointerButton { pos: p, button, pressed, modifiers });
    }
    if modifiers != Modifiers::NONE {
        h.event(Event::ModifiersChanged(Modifiers::NONE));
    }
}

fn random_point(rng: &mut Rng) -> Pos2 {
    pos2(rng.unit() * WINDOW.x, rng.unit() * WINDOW.y)
}

/// A point far away: outside the window, sometimes absurdly far.
fn far_point(rng: &mut Rng) -> Pos2 {
    let r = *rng.pick(&[-1e6_f32, -5e4, -2000.0, -1.0, 0.0, 1401.0, 3000.0, 5e4, 1e6]);
    let s = *rng.pick(&[-1e6_f32, -5e4, -900.0, -1.0, 0.0, 1001.0, 2500.0, 5e4, 1e6]);
    if rng.chance(0.5) { pos2(r, rng.unit() * WINDOW.y) } else { pos2(rng.unit() * WINDOW.x, s) }
}

fn drag(h: &mut Harness<'_, QuenchlessApp>, rng: &mut Rng, from: Pos2) -> String {
    let button = if rng.chance(0.85) { PointerButton::Primary } else { PointerButton::Secondary };
    h.hover_at(from);
    h.step();
    h.event(Event::PointerButton { pos: from, button, pressed: true, modifiers: Modifiers::NONE });
    h.step();
    let mut last = from;
    let moves = 1 + rng.below(6);
    for _ in 0..moves {
        last = if rng.chance(0.5) { far_point(rng) } else { last + vec2(rng.unit() - 0.5, rng.unit() - 0.5) * 400.0 };
        h.hover_at(last);
        h.step();
    }
    h.event(Event::PointerButton { pos: last, button, pressed: false, modifiers: Modifiers::NONE });
    if rng.chance(0.3) {
        h.event(Event::PointerGone);
    }
    format!("drag {button:?} from {from:?} through {moves} moves to {last:?}")
}

const KEYS: [(Modifiers, Key); 22] = [
    (Modifiers::COMMAND, Key::Z),
    (Modifiers::COMMAND, Key::Z),
    (Modifiers::COMMAND, Key::Y),
    (Modifiers::COMMAND.plus(Modifiers::SHIFT), Key::Z),
    (Modifiers::COMMAND, Key::S),
    (Modifiers::COMMAND.plus(Modifiers::SHIFT), Key::S),
    (Modifiers::COMMAND, Key::O),
    (Modifiers::COMMAND, Key::A),
    (Modifiers::NONE, Key::Escape),
    (Modifiers::NONE, Key::Enter),
    (Modifiers::NONE, Key::Tab),
    (Modifiers::SHIFT, Key::Tab),
    (Modifiers::NONE, Key::Space),
    (Modifiers::NONE, Key::Delete),
    (Modifiers::NONE, Key::Backspace),
    (Modifiers::NONE, Key::ArrowUp),
    (Modifiers::NONE, Key::ArrowDown),
    (Modifiers::NONE, Key::ArrowLeft),
    (Modifiers::NONE, Key::ArrowRight),
    (Modifiers::NONE, Key::PageDown),
    (Modifiers::NONE, Key::Home),
    (Modifiers::NONE, Key::End),
];

/// One random interaction; returns what it did.
fn act(h: &mut Harness<'_, QuenchlessApp>, rng: &mut Rng, values: &[String]) -> String {
    let all = widgets(h);
    let roll = rng.below(100);
    match roll {
        0..=34 => {
            let clickable: Vec<&Widget> = all.iter().filter(|w| CLICKABLE.contains(&w.role)).collect();
            if clickable.is_empty() {
                return "no clickable widget".into();
            }
            let w = *rng.pick(&clickable);
            let (button, modifiers) = match rng.below(10) {
                0 => (PointerButton::Secondary, Modifiers::NONE),
                1 => (PointerButton::Primary, Modifiers::COMMAND),
                _ => (PointerButton::Primary, Modifiers::NONE),
            };
            click_at(h, w.rect.center(), button, modifiers);
            format!("click {button:?} {modifiers:?} on {:?} \"{}\"", w.role, w.label)
        }
        35..=56 => {
            // Text fields, and drag values (a click turns them into a text field).
            let fields: Vec<&Widget> =
                all.iter().filter(|w| matches!(w.role, Role::TextInput | Role::SpinButton)).collect();
            if fields.is_empty() {
                return "no text field".into();
            }
            let w = (*rng.pick(&fields)).clone();
            let v = rng.pick(values).clone();
            click_at(h, w.rect.center(), PointerButton::Primary, Modifiers::NONE);
            h.step();
            h.key_press_modifiers(Modifiers::COMMAND, Key::A);
            h.event(Event::Text(v.clone()));
            h.step();
            // Commit the entry by Enter, Tab, or a click elsewhere.
            match rng.below(3) {
                0 => h.key_press(Key::Enter),
                1 => h.key_press(Key::Tab),
                _ => click_at(h, pos2(WINDOW.x - 5.0, WINDOW.y - 5.0), PointerButton::Primary, Modifiers::NONE),
            }
            let shown: String = v.chars().take(40).collect();
            format!("type \"{shown}\" ({} chars) into \"{}\"", v.chars().count(), w.label)
        }
        57..=64 => {
            let sliders: Vec<&Widget> =
                all.iter().filter(|w| matches!(w.role, Role::Slider | Role::SpinButton)).collect();
            if sliders.is_empty() {
                return "no slider".into();
            }
            let w = (*rng.pick(&sliders)).clone();
            let d = drag(h, rng, w.rect.center());
            format!("{d} on {:?} \"{}\"", w.role, w.label)
        }
        65..=82 => {
            let handles = h.state().handle_positions().to_vec();
            let plots = h.state().plot_areas().to_vec();
            let from = if !handles.is_empty() && rng.chance(0.4) {
                rng.pick(&handles).1
            } else if !plots.is_empty() && rng.chance(0.8) {
                let r = rng.pick(&plots).1;
                r.min + vec2(rng.unit() * r.width(), rng.unit() * r.height())
            } else {
                random_point(rng)
            };
            drag(h, rng, from)
        }
        83..=92 => {
            let (m, k) = *rng.pick(&KEYS);
            h.key_press_modifiers(m, k);
            format!("key {m:?} {k:?}")
        }
        93..=95 => {
            let p = random_point(rng);
            h.hover_at(p);
            let delta = vec2(rng.unit() - 0.5, rng.unit() - 0.5) * 2000.0;
            h.event(Event::MouseWheel {
                unit: egui::MouseWheelUnit::Point,
                delta,
                phase: egui::TouchPhase::Move,
                source: egui::MouseWheelSource::Unknown,
                modifiers: Modifiers::NONE,
            });
            format!("scroll {delta:?} at {p:?}")
        }
        _ => {
            let p = random_point(rng);
            let button = *rng.pick(&[PointerButton::Primary, PointerButton::Secondary, PointerButton::Middle]);
            click_at(h, p, button, Modifiers::NONE);
            if rng.chance(0.3) {
                click_at(h, p, button, Modifiers::NONE);
            }
            format!("click {button:?} at {p:?}")
        }
    }
}

/// Words of shown text that would mean a figure is not a number.
fn non_finite_word(text: &str) -> bool {
    text.split(|c: char| !(c.is_alphanumeric() || c == '.')).any(|w| matches!(w, "NaN" | "inf" | "-inf"))
}

/// Checks after each step; returns a description of what is wrong.
fn check(h: &mut Harness<'_, QuenchlessApp>) -> Result<(), String> {
    quenchless_profile::convert::validate(h.state().study()).map_err(|e| format!("invalid study held: {e}"))?;
    let results = h.state_mut().results(Quality::SETTLED);
    for (i, r) in results.candidates.iter().enumerate() {
        if let Some(o) = r.ready() {
            let rep = &o.evaluation.report;
            let figures = [
                ("q_star", rep.q_star),
                ("final_coherence_ratio", rep.final_coherence_ratio),
                ("final_energy_quanta", rep.final_energy_quanta),
                ("work_quanta", rep.work_quanta),
                ("friction_work_quanta", rep.friction_work_quanta),
                ("peak_energy_quanta", rep.peak_energy_quanta),
                ("min_omega2", rep.min_omega2),
                ("duration_s", rep.duration_s),
            ];
            if let Some((name, v)) = figures.iter().find(|(_, v)| !v.is_finite()) {
                return Err(format!("candidate {i}: {name} = {v} would be shown"));
            }
        }
    }
    if let Some(Ok(c)) = &results.cycle {
        let mut figures = vec![("spectral_radius", c.spectral_radius), ("cycle_time_s", c.cycle_time_s)];
        if let Some(f) = &c.figures {
            figures.extend([
                ("work_out_quanta", f.work_out_quanta),
                ("heat_hot_quanta", f.heat_hot_quanta),
                ("heat_cold_quanta", f.heat_cold_quanta),
                ("power_w", f.power_w),
                ("efficiency", f.efficiency.unwrap_or(0.0)),
            ]);
        }
        if let Some((name, v)) = figures.iter().find(|(_, v)| !v.is_finite()) {
            return Err(format!("cycle: {name} = {v} would be shown"));
        }
    }
    // Shown text: a non-finite figure printed anywhere except where an error message
    // quotes what the user typed.
    // Names the user typed (candidates, axes, the study) may read "NaN kHz": they are
    // names, not figures, wherever they are shown (a list, a file name).
    let study = h.state().study().clone();
    let mut names: Vec<String> = study.candidates.iter().map(|c| c.name.clone()).collect();
    names.push(study.name.clone());
    if let Some(m) = &study.trap.model {
        names.push(m.reference_name.clone());
        names.extend(m.axes.iter().map(|a| a.name.clone()));
        if let quenchless_profile::study::WellSpec::Tweezer { axial_name, .. } = &m.reference_well {
            names.push(axial_name.clone());
        }
    }
    names.retain(|n| !n.trim().is_empty());
    for n in h.root().children_recursive() {
        let a = n.accesskit_node();
        if a.role() == Role::TextInput {
            continue;
        }
        let Some(mut label) = a.label() else { continue };
        for name in &names {
            label = label.replace(name.as_str(), "");
        }
        // A file's name in the chooser's list is a name too (an export saved as typed).
        if [".csv", ".ron", ".svg", ".png", ".txt"].iter().any(|ext| label.ends_with(ext)) {
            continue;
        }
        let quotes_input = label.contains('"') || label.contains("not allowed") || label.contains("Not applied");
        if non_finite_word(&label) && !quotes_input {
            return Err(format!("non-finite figure shown: {label}"));
        }
    }
    Ok(())
}

fn env_or<T: std::str::FromStr>(name: &str, default: T) -> T {
    std::env::var(name).ok().and_then(|v| v.trim().parse().ok()).unwrap_or(default)
}

#[test]
fn thousands_of_random_interactions_keep_the_study_valid() {
    let seed: u64 = env_or("QUENCHLESS_STRESS_SEED", DEFAULT_SEED);
    let steps: usize = env_or("QUENCHLESS_STRESS_STEPS", DEFAULT_STEPS);
    let values = values();
    let mut rng = Rng::new(seed);
    // Random clicks reach the file chooser: files chosen outside this folder are refused.
    let sandbox = tempfile::tempdir().expect("temp dir");
    let mut h = app_harness_with(AppOptions { sandbox: Some(sandbox.path().to_path_buf()), ..AppOptions::default() });
    // Typed garbage includes characters no bundled font has; the app then draws a box
    // as every egui app does (egui's default), rather than the test harness's panic.
    // The other tests keep the panic, so the app's own text stays covered.
    h.ctx.set_missing_glyph_policy(egui::MissingGlyphPolicy::Tofu);
    let mut log: VecDeque<String> = VecDeque::new();
    let t0 = std::time::Instant::now();
    let mut refusals = 0_usize;
    let mut last_error: Option<String> = None;
    for step in 0..steps {
        let outcome = catch_unwind(AssertUnwindSafe(|| {
            let what = act(&mut h, &mut rng, &values);
            h.run_ok();
            (what, check(&mut h))
        }));
        match outcome {
            Ok((what, result)) => {
                log.push_back(what);
                if log.len() > 12 {
                    log.pop_front();
                }
                if let Err(e) = result {
                    panic!(
                        "stress seed {seed:#x}, step {step} of {steps}: {e}\nlast actions (newest last):\n  {}",
                        Vec::from(log).join("\n  ")
                    );
                }
                let shown = h.state().error().map(str::to_string);
                if shown != last_error && shown.as_deref().is_some_and(|e| e.starts_with("Not applied")) {
                    refusals += 1;
                }
                last_error = shown;
            }
            Err(panic) => {
                eprintln!(
                    "stress seed {seed:#x}, step {step} of {steps}: panicked\nlast actions before it (newest last):\n  {}",
                    Vec::from(log).join("\n  ")
                );
                resume_unwind(panic);
            }
        }
    }
    eprintln!(
        "stress seed {seed:#x}: {steps} steps in {:.1} s, {refusals} edits refused with a message",
        t0.elapsed().as_secs_f64()
    );
    // The random walk reached the refusal path at least once (hostile values do).
    assert!(steps < 200 || refusals > 0, "no edit was ever refused: the walk never typed a bad value");
}
