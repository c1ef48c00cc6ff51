//! Common trapped species by name, a convenience for the trap model (a mass in u or kg
//! is always accepted instead). Atomic masses from the Atomic Mass Evaluation 2016
//! (Wang et al., Chinese Phys. C 41, 030003 (2017)), from memory; an ion's mass is
//! the atom's minus one electron mass (CODATA 2018: 5.48579909065e-4 u), the binding
//! energy of that electron (a few eV, ~1e-8 u) left out.

use crate::units::ATOMIC_MASS_UNIT_KG;

/// Electron mass, u (CODATA 2018).
const ELECTRON_MASS_U: f64 = 5.485_799_090_65e-4;

/// Names and neutral atomic masses, u. Ions are named with a trailing "+".
const ATOMS: [(&str, f64); 14] = [
    ("Li6", 6.015_122_887_4),
    ("Li7", 7.016_003_436_6),
    ("Be9", 9.012_183_065),
    ("Na23", 22.989_769_282),
    ("Mg25", 24.985_836_976),
    ("K39", 38.963_706_486_4),
    ("K40", 39.963_998_166),
    ("Ca40", 39.962_590_863),
    ("Rb87", 86.909_180_527),
    ("Sr88", 87.905_612_5),
    ("Cs133", 132.905_451_961),
    ("Ba138", 137.905_247),
    ("Yb171", 170.936_331_5),
    ("Yb174", 173.938_866_4),
];

/// Ions commonly held in Paul traps (singly charged).
const IONS: [&str; 7] = ["Be9", "Mg25", "Ca40", "Sr88", "Ba138", "Yb171", "Yb174"];

/// The mass of a named species, kg: "Rb87" (an atom) or "Ca40+" (a singly charged ion).
pub fn mass_kg(name: &str) -> Option<f64> {
    let (atom, ion) = match name.trim().strip_suffix('+') {
        Some(a) => (a, true),
        None => (name.trim(), false),
    };
    let &(_, u) = ATOMS.iter().find(|(n, _)| n.eq_ignore_ascii_case(atom))?;
    if ion && !IONS.iter().any(|n| n.eq_ignore_ascii_case(atom)) {
        return None;
    }
    Some(if ion { u - ELECTRON_MASS_U } else { u } * ATOMIC_MASS_UNIT_KG)
}

/// Every name [`mass_kg`] knows, for messages and menus.
pub fn names() -> Vec<String> {
    let mut v: Vec<String> = ATOMS.iter().map(|(n, _)| (*n).to_string()).collect();
    v.extend(IONS.iter().map(|n| format!("{n}+")));
    v
}
