//! Figures built from printed text, shared by the unit tests of this crate.
#![allow(clippy::unwrap_used)]

use crate::Figures;
use crate::reported::{Quantity, parse};

/// n points and the printed figures `items`, the p-value not declared
/// one-sided.
pub fn figs(n: usize, items: &[(Quantity, &str)]) -> Figures {
    items.iter().fold(Figures::new(n, false), |f, (q, t)| {
        f.with(parse(t, *q).unwrap())
    })
}
