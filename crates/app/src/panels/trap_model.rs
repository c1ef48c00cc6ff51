//! The editor of the study's trap model: the particle and every axis the control moves,
//! each with how it follows the drawn ramp and the shape of its well.

use crate::widgets::{Allowed, Kind, optional_field, value_field};
use quenchless_profile::Study;
use quenchless_profile::study::{AxisSpec, ParticleSpec, TrapModelSpec, TweezerAxialSpec, WellSpec};
use quenchless_profile::units::Quantity;

const LENGTH: Kind = Kind::Unit(Quantity::Length);
const FREQ: Kind = Kind::Unit(Quantity::Frequency);

/// A new tweezer model: rubidium-87, waist 800 nm at 850 nm light (a common starting
/// point; every value is editable).
fn tweezer_model() -> TrapModelSpec {
    TrapModelSpec {
        particle: Some(ParticleSpec::Species("Rb87".into())),
        reference_name: "radial".into(),
        reference_well: WellSpec::Tweezer {
            waist_m: 8e-7,
            axial: TweezerAxialSpec::Wavelength(8.5e-7),
            axial_name: "axial".into(),
        },
        axes: Vec::new(),
    }
}

fn well_name(w: &WellSpec) -> &'static str {
    match w {
        WellSpec::Harmonic => "harmonic",
        WellSpec::Gaussian { .. } => "Gaussian (beam's radial profile)",
        WellSpec::Lorentzian { .. } => "Lorentzian (beam's axial profile)",
        WellSpec::Tweezer { .. } => "tweezer (radial and axial axes)",
    }
}

/// The well editor of one axis; `tweezer` offers the tweezer shape (the reference axis).
fn well_editor(ui: &mut egui::Ui, id: &str, well: &mut WellSpec, tweezer: bool) {
    let choices: Vec<WellSpec> = {
        let mut v = vec![
            WellSpec::Harmonic,
            WellSpec::Gaussian { waist_m: 8e-7 },
            WellSpec::Lorentzian { rayleigh_range_m: 2.4e-6 },
        ];
        if tweezer {
            v.push(tweezer_model().reference_well);
        }
        v
    };
    egui::ComboBox::new(format!("{id}-well"), "well shape").selected_text(well_name(well)).show_ui(ui, |ui| {
        for c in choices {
            let same = std::mem::discriminant(&c) == std::mem::discriminant(well);
            if ui.selectable_label(same, well_name(&c)).clicked() && !same {
                *well = c;
            }
        }
    });
    match well {
        WellSpec::Harmonic => {}
        WellSpec::Gaussian { waist_m } => {
            value_field(ui, "Waist w0", waist_m, LENGTH, Allowed::Positive);
        }
        WellSpec::Lorentzian { rayleigh_range_m } => {
            value_field(ui, "Rayleigh range zR", rayleigh_range_m, LENGTH, Allowed::Positive);
        }
        WellSpec::Tweezer { waist_m, axial, axial_name } => {
            value_field(ui, "Waist w0", waist_m, LENGTH, Allowed::Positive);
            let by_ratio = matches!(axial, TweezerAxialSpec::FrequencyRatio(_));
            ui.horizontal(|ui| {
                if ui.radio(!by_ratio, "axial axis from the wavelength").clicked() && by_ratio {
                    *axial = TweezerAxialSpec::Wavelength(8.5e-7);
                }
                if ui.radio(by_ratio, "from a measured ν_axial/ν_radial").clicked() && !by_ratio {
                    *axial = TweezerAxialSpec::FrequencyRatio(0.24);
                }
            });
            match axial {
                TweezerAxialSpec::Wavelength(l) => {
                    value_field(ui, "Wavelength", l, LENGTH, Allowed::Positive);
                }
                TweezerAxialSpec::FrequencyRatio(r) => {
                    value_field(ui, "ν_axial / ν_radial", r, Kind::Number, Allowed::Positive);
                }
            }
            ui.horizontal(|ui| {
                let l = ui.label("Axial axis name");
                ui.text_edit_singleline(axial_name).labelled_by(l.id);
            });
        }
    }
}

fn particle_editor(ui: &mut egui::Ui, particle: &mut Option<ParticleSpec>) {
    let words = match particle {
        None => "not stated (harmonic axes need none)".to_string(),
        Some(ParticleSpec::Species(s)) => s.clone(),
        Some(ParticleSpec::MassU(_)) => "mass in u".into(),
        Some(ParticleSpec::MassKg(_)) => "mass in kg".into(),
    };
    ui.horizontal(|ui| {
        egui::ComboBox::new("trap-particle", "particle").selected_text(words).show_ui(ui, |ui| {
            if ui.selectable_label(particle.is_none(), "not stated").clicked() {
                *particle = None;
            }
            if ui.selectable_label(matches!(particle, Some(ParticleSpec::MassU(_))), "mass in u").clicked()
                && !matches!(particle, Some(ParticleSpec::MassU(_)))
            {
                *particle = Some(ParticleSpec::MassU(86.909_180_527));
            }
            for name in quenchless_profile::species::names() {
                let on = matches!(particle, Some(ParticleSpec::Species(s)) if *s == name);
                if ui.selectable_label(on, &name).clicked() {
                    *particle = Some(ParticleSpec::Species(name));
                }
            }
        });
    });
    match particle {
        Some(ParticleSpec::MassU(u)) => {
            value_field(ui, "Mass [u]", u, Kind::Number, Allowed::Positive);
        }
        Some(ParticleSpec::MassKg(kg)) => {
            value_field(ui, "Mass", kg, Kind::Unit(Quantity::Mass), Allowed::Positive);
        }
        _ => {}
    }
}

/// Draws the editor; edits go straight into the study (the app's history records them).
pub fn trap_model_ui(ui: &mut egui::Ui, study: &mut Study) {
    egui::CollapsingHeader::new("Trap model: axes and wells").default_open(false).show(ui, |ui| {
        let Some(model) = study.trap.model.as_mut() else {
            ui.label("One ideal harmonic axis: the ramp's own.");
            ui.horizontal(|ui| {
                if ui.button("Describe a tweezer").on_hover_text("Radial Gaussian and axial Lorentzian axes").clicked()
                {
                    study.trap.model = Some(tweezer_model());
                }
                if ui.button("Add an axis").clicked() {
                    study.trap.model = Some(TrapModelSpec {
                        axes: vec![AxisSpec { name: "second".into(), ..AxisSpec::default() }],
                        ..TrapModelSpec::default()
                    });
                }
            });
            return;
        };
        ui.label(
            "Every axis the control moves: ω_axis² = gain · ω² + sign(F)(2πF)² with ω the reference \
             axis's. The verdict is the worst axis's; cycles use the reference axis only.",
        );
        particle_editor(ui, &mut model.particle);
        ui.separator();
        ui.horizontal(|ui| {
            let l = ui.label("Reference axis (the ramp is drawn for it)");
            ui.text_edit_singleline(&mut model.reference_name).labelled_by(l.id);
        });
        well_editor(ui, "reference", &mut model.reference_well, true);
        let mut remove = None;
        for (i, a) in model.axes.iter_mut().enumerate() {
            ui.separator();
            ui.push_id(("trap-axis", i), |ui| {
                ui.horizontal(|ui| {
                    let l = ui.label("Axis name");
                    ui.text_edit_singleline(&mut a.name).labelled_by(l.id);
                    if ui.button("Remove").clicked() {
                        remove = Some(i);
                    }
                });
                value_field(ui, "Gain on ω²", &mut a.gain, Kind::Number, Allowed::Any);
                value_field(ui, "Offset F (signed)", &mut a.offset_hz, FREQ, Allowed::Any);
                optional_field(ui, "Lowest frequency", &mut a.lowest_frequency_hz, FREQ, 1e3);
                optional_field(ui, "Highest frequency", &mut a.highest_frequency_hz, FREQ, 1e6);
                well_editor(ui, &format!("axis-{i}"), &mut a.well, false);
            });
        }
        if let Some(i) = remove {
            model.axes.remove(i);
        }
        ui.separator();
        let mut drop_model = false;
        ui.horizontal(|ui| {
            if ui.button("Add an axis").clicked() {
                let name = format!("axis {}", model.axes.len() + 2);
                model.axes.push(AxisSpec { name, ..AxisSpec::default() });
            }
            drop_model = ui.button("One harmonic axis again").on_hover_text("Remove the trap model").clicked();
        });
        if drop_model {
            study.trap.model = None;
        }
    });
}
