//! The panels of the window, one module each.

pub mod candidates;
pub mod compare;
pub mod cycle;
pub mod handles;
pub mod plots;
pub mod verdict;
