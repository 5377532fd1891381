//! Why the sweep cannot start: the few inputs [`crate::run_audit`]
//! refuses, each with the number involved. Readers (`patternproof-io`)
//! refuse such input with the file and line first, so for a command-line
//! run these mean a check is missing upstream.

/// Why [`crate::run_audit`] did not run.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum AuditError {
    /// The significance level is not strictly between 0 and 1.
    #[error("the significance level {alpha} is not strictly between 0 and 1")]
    Alpha {
        /// The level given.
        alpha: f64,
    },
    /// Fewer than two points: no nearest-neighbour distance exists.
    #[error("the sweep needs at least two points, {n} given")]
    TooFewPoints {
        /// Points given.
        n: usize,
    },
    /// A coordinate is NaN or infinite, so no distance to it means anything.
    #[error("point {index} (0-based) has a coordinate that is not a finite number")]
    NotFinite {
        /// The first such point, 0-based in the order given.
        index: usize,
    },
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::AuditError;
    use crate::{AuditOptions, run_audit};

    /// Each refusal comes back as its kind with the number involved; the
    /// same points with a valid α run (no simulations, so the test is quick).
    #[test]
    fn refused_inputs_name_their_kind() {
        let quick = |alpha: f64| AuditOptions {
            alpha,
            sims: 0,
            ..AuditOptions::default()
        };
        let square = [[0.0, 0.0], [4.0, 0.0], [0.0, 3.0], [4.0, 3.0], [2.0, 1.5]];
        let run = |points: &[[f64; 2]], alpha: f64| {
            run_audit(points, &[], &quick(alpha), &|| {}).map(|a| a.n)
        };
        assert_eq!(run(&square, 0.05), Ok(5));
        assert_eq!(run(&square, 1.0), Err(AuditError::Alpha { alpha: 1.0 }));
        assert_eq!(run(&square, 0.0), Err(AuditError::Alpha { alpha: 0.0 }));
        assert_eq!(
            run(&square[..1], 0.05),
            Err(AuditError::TooFewPoints { n: 1 })
        );
        assert_eq!(run(&[], 0.05), Err(AuditError::TooFewPoints { n: 0 }));
        let mut holed = square.to_vec();
        holed[3][1] = f64::NAN;
        assert_eq!(run(&holed, 0.05), Err(AuditError::NotFinite { index: 3 }));
        holed[3][1] = 3.0;
        holed[4][0] = f64::INFINITY;
        let e = run(&holed, 0.05).unwrap_err();
        assert_eq!(e, AuditError::NotFinite { index: 4 });
        assert_eq!(
            e.to_string(),
            "point 4 (0-based) has a coordinate that is not a finite number"
        );
    }
}
