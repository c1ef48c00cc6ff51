//! Interaction tests of the desktop app: egui_kittest drives the real app state,
//! finding widgets by their accessible labels (no pixel snapshots).

mod design;
mod dialogs;
mod files;
mod harness;
mod real_traps;
mod shaping;
mod stress;
mod workers;
