//! Small labelled inputs: a value typed with its unit ("35 kHz", "12 µs"), checked on
//! Enter or when the field loses focus; a bad entry shows what is wrong and keeps the
//! old value.

use quenchless_profile::units::{Quantity, format_quantity, parse_quantity};

/// What a typed value may be.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Allowed {
    /// Any finite value.
    Any,
    /// > 0.
    Positive,
    /// >= 0.
    NonNegative,
}

impl Allowed {
    fn check(self, v: f64) -> Result<(), &'static str> {
        match self {
            Self::Any => Ok(()),
            Self::Positive if v > 0.0 => Ok(()),
            Self::NonNegative if v >= 0.0 => Ok(()),
            Self::Positive => Err("> 0"),
            Self::NonNegative => Err(">= 0"),
        }
    }
}

/// How to read a typed value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Kind {
    /// A quantity with a unit.
    Unit(Quantity),
    /// A plain number (occupations, rates per second given as numbers).
    Number,
    /// A whole number (orders, bits, counts), shown without decimals.
    Whole,
}

/// Where the app keeps the study's display units for the value fields (set each frame
/// by [`set_display_units`]).
const DISPLAY_UNITS: &str = "quenchless-display-units";

/// The display settings the value fields follow: the study's units and, for the
/// dimensionless view, the trap's start frequency nu_i = omega_i / 2 pi.
#[derive(Debug, Clone, Copy, PartialEq)]
struct FieldUnits {
    units: quenchless_profile::study::DisplayUnits,
    start_hz: f64,
}

/// Makes the value fields show frequencies and times in the study's display units, or
/// in the dimensionless view as multiples of omega_i ("0.25 ω_i") and of 1/omega_i
/// ("15.1 /ω_i") (any unit is still accepted when typing, and so are those two). Call
/// once per frame.
pub fn set_display_units(ctx: &egui::Context, units: quenchless_profile::study::DisplayUnits, start_hz: f64) {
    ctx.data_mut(|d| d.insert_temp(egui::Id::unique(DISPLAY_UNITS), FieldUnits { units, start_hz }));
}

/// The suffixes of a dimensionless frequency (a multiple of omega_i) and time (of 1/omega_i).
const PER_OMEGA_I: [&str; 3] = ["/ω_i", "/w_i", "/omega_i"];
const TIMES_OMEGA_I: [&str; 3] = ["ω_i", "w_i", "omega_i"];

/// Trims a shown number to six decimals without trailing zeros.
fn trim6(x: f64) -> String {
    let s = format!("{x:.6}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s.is_empty() || s == "-" { "0".to_string() } else { s.to_string() }
}

/// A value in its kind's display unit: the study's for frequencies and times (or the
/// dimensionless view's), else the best-fitting SI unit.
fn format_value_in(v: f64, kind: Kind, display: Option<FieldUnits>) -> String {
    let Some(FieldUnits { units: d, start_hz }) = display else { return format_value(v, kind) };
    let omega_i = quenchless_physics::constants::TWO_PI * start_hz;
    let fits = |x: f64| x != 0.0 && x.abs() >= 1e-3 && x.abs() < 1e7;
    match kind {
        Kind::Unit(Quantity::Frequency) if d.dimensionless && start_hz > 0.0 && fits(v / start_hz) => {
            format!("{} {}", trim6(v / start_hz), TIMES_OMEGA_I[0])
        }
        Kind::Unit(Quantity::Time) if d.dimensionless && start_hz > 0.0 && fits(v * omega_i) => {
            format!("{} {}", trim6(v * omega_i), PER_OMEGA_I[0])
        }
        Kind::Unit(Quantity::Frequency) if !d.dimensionless && fits(v / d.frequency.hz()) => {
            format!("{} {}", trim6(v / d.frequency.hz()), d.frequency.symbol())
        }
        Kind::Unit(Quantity::Time) if !d.dimensionless && fits(v / d.time.seconds()) => {
            format!("{} {}", trim6(v / d.time.seconds()), d.time.symbol())
        }
        _ => format_value(v, kind),
    }
}

/// A frequency typed as a multiple of omega_i ("0.25 ω_i", in Hz) or a time as a
/// multiple of 1/omega_i ("15 /ω_i", in s); `None` when the text has no such suffix.
fn parse_dimensionless(text: &str, kind: Kind, display: Option<FieldUnits>) -> Option<Result<f64, String>> {
    let t = text.trim();
    let time = match kind {
        Kind::Unit(Quantity::Time) => true,
        Kind::Unit(Quantity::Frequency) => false,
        _ => return None,
    };
    let suffixes: &[&str] = if time { &PER_OMEGA_I } else { &TIMES_OMEGA_I };
    // "/ω_i" also ends with "ω_i": a time's suffix is looked for first.
    let number = suffixes.iter().find_map(|s| t.strip_suffix(s))?.trim();
    let omega_i = display.map_or(0.0, |d| quenchless_physics::constants::TWO_PI * d.start_hz);
    if !(omega_i.is_finite() && omega_i > 0.0) {
        return Some(Err(format!("\"{text}\": the trap's start frequency is not set, so ω_i is unknown")));
    }
    let to_si = |x: f64| if time { x / omega_i } else { x * omega_i / quenchless_physics::constants::TWO_PI };
    Some(
        number
            .parse::<f64>()
            .ok()
            .filter(|v| v.is_finite())
            .map(to_si)
            .ok_or_else(|| format!("\"{text}\": expected a number before {}", suffixes[0])),
    )
}

fn format_value(v: f64, kind: Kind) -> String {
    match kind {
        Kind::Unit(q) => format_quantity(v, q),
        Kind::Whole if v.is_finite() && v.fract() == 0.0 && v.abs() < 1e15 => format!("{v:.0}"),
        Kind::Number | Kind::Whole => crate::units::sci(v),
    }
}

fn parse_value(text: &str, kind: Kind, display: Option<FieldUnits>) -> Result<f64, String> {
    if let Some(r) = parse_dimensionless(text, kind, display) {
        return r;
    }
    match kind {
        Kind::Unit(q) => parse_quantity(text, q).map_err(|e| e.to_string()),
        Kind::Number => text
            .trim()
            .parse::<f64>()
            .ok()
            .filter(|v| v.is_finite())
            .ok_or_else(|| format!("\"{text}\": expected a finite number")),
        Kind::Whole => text
            .trim()
            .parse::<f64>()
            .ok()
            .filter(|v| v.is_finite() && v.fract() == 0.0)
            .ok_or_else(|| format!("\"{text}\": expected a whole number")),
    }
}

/// A labelled value field. Returns true when `value` was changed by a valid entry.
pub fn value_field(ui: &mut egui::Ui, label: &str, value: &mut f64, kind: Kind, allowed: Allowed) -> bool {
    let display: Option<FieldUnits> = ui.data(|d| d.get_temp(egui::Id::unique(DISPLAY_UNITS)));
    value_field_in(ui, label, value, kind, allowed, display)
}

/// A value field always in lab units, also in the dimensionless view: for the trap's
/// start frequency, which defines omega_i.
pub fn lab_value_field(ui: &mut egui::Ui, label: &str, value: &mut f64, kind: Kind, allowed: Allowed) -> bool {
    let display: Option<FieldUnits> = ui.data(|d| d.get_temp(egui::Id::unique(DISPLAY_UNITS)));
    let lab = display.map(|mut d| {
        d.units.dimensionless = false;
        d
    });
    value_field_in(ui, label, value, kind, allowed, lab)
}

fn value_field_in(
    ui: &mut egui::Ui,
    label: &str,
    value: &mut f64,
    kind: Kind,
    allowed: Allowed,
    display: Option<FieldUnits>,
) -> bool {
    let id = ui.scope_id().with(("value-field", label));
    let format_value = |v: f64, kind: Kind| format_value_in(v, kind, display);
    let mut changed = false;
    ui.horizontal(|ui| {
        let lab = ui.label(label);
        let stored: Option<String> = ui.data(|d| d.get_temp(id));
        let mut text = stored.unwrap_or_else(|| format_value(*value, kind));
        // Wide enough for the whole value and its unit ("49.022554 kHz").
        let width = (7.5 * text.chars().count() as f32 + 14.0).clamp(96.0, 220.0);
        let resp =
            ui.add(egui::TextEdit::singleline(&mut text).desired_width(width).id(id.with("edit"))).labelled_by(lab.id);
        let err_id = id.with("error");
        if resp.has_focus() {
            ui.data_mut(|d| d.insert_temp(id, text.clone()));
        }
        // lost_focus can be reported on two frames; the second sees the untouched text.
        if resp.lost_focus() {
            ui.data_mut(|d| d.remove::<String>(id));
        }
        if resp.lost_focus() && text != format_value(*value, kind) {
            match parse_value(&text, kind, display).and_then(|v| {
                allowed
                    .check(v)
                    .map(|()| v)
                    .map_err(|a| format!("{label} = {} is not allowed: must be {a}", format_value(v, kind)))
            }) {
                Ok(v) => {
                    #[expect(clippy::float_cmp, reason = "an exact re-entry of the same value is not an edit")]
                    let same = v == *value;
                    if !same {
                        *value = v;
                        changed = true;
                    }
                    ui.data_mut(|d| d.remove::<FieldError>(err_id));
                }
                Err(e) => {
                    ui.data_mut(|d| d.insert_temp(err_id, FieldError(format!("{label}: {e}"))));
                }
            }
        }
    });
    if let Some(FieldError(e)) = ui.data(|d| d.get_temp::<FieldError>(id.with("error"))) {
        ui.add(egui::Label::new(egui::RichText::new(e).color(ui.visuals().error_fg_color)).wrap());
    }
    changed
}

/// A refused entry's message, shown under its field until the field takes a value or
/// the edit it refers to is gone (see [`clear_field_errors`]).
#[derive(Clone, Default)]
struct FieldError(String);

/// Forgets every field's refused-entry message: called when the study or the
/// selected candidate changes (an undo, a redo, another candidate, another file), so a
/// message never outlives the edit it was about or shows under another candidate.
pub fn clear_field_errors(ctx: &egui::Context) {
    ctx.data_mut(egui::util::IdTypeMap::remove_by_type::<FieldError>);
}

/// A field for an optional limit: a checkbox "state it" and the value.
pub fn optional_field(ui: &mut egui::Ui, label: &str, value: &mut Option<f64>, kind: Kind, default: f64) -> bool {
    let mut on = value.is_some();
    let mut changed = false;
    ui.horizontal(|ui| {
        if ui.checkbox(&mut on, label).changed() {
            *value = on.then_some(value.unwrap_or(default));
            changed = true;
        }
        if let Some(v) = value.as_mut() {
            changed |= value_field(ui, &format!("{label} value"), v, kind, Allowed::Positive);
        }
    });
    changed
}

/// Colour of candidate i.
pub fn colour_of(study: &quenchless_profile::Study, i: usize) -> egui::Color32 {
    let [r, g, b] =
        study.candidates.get(i).and_then(|c| c.colour).unwrap_or(crate::demo::PALETTE[i % crate::demo::PALETTE.len()]);
    egui::Color32::from_rgb(r, g, b)
}
