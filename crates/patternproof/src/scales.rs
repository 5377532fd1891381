//! `scales`: Ripley's K and the L function in every window of the sweep,
//! under each edge correction, with a global envelope test per window.
//!
//! [`scales`] does it in one call. A front end that wants to look at the
//! work before it starts (how many patterns, how long one takes) uses
//! [`ScalesJob`]: [`ScalesJob::prepare`] builds the windows, and
//! [`ScalesJob::run`] hands the plan to a check before simulating.

use crate::error::{Error, Refusal};
use crate::input::Input;
use crate::progress::{Progress, stoppable, ticker};
use geo::Translate;
use patternproof_audit::sweep::{Frame, centre};
use patternproof_audit::window::{NamedShape, Window, WindowKind, WindowOptions, build_windows};
use patternproof_core::Xy;
use patternproof_core::nearest::{mean, nearest_distances};
use patternproof_scales::{Plan, ScalesOptions, ScalesRun, plan};

/// A K audit and the notes of the window sweep it ran over.
#[derive(Debug, Clone)]
pub struct ScalesResult {
    /// Curves, tests and verdicts (`scales.json`).
    pub run: ScalesRun,
    /// Why windows were left out of the sweep.
    pub notes: Vec<String>,
}

/// The windows of a K audit, built in coordinates centred on the data (as
/// the nearest-neighbour audit builds them), ready to run.
#[derive(Debug, Clone)]
pub struct ScalesJob {
    points: Vec<Xy>,
    windows: Vec<Window>,
    notes: Vec<String>,
    unit: String,
    subject: String,
}

impl ScalesJob {
    /// Build the windows of `window_options` around `input`'s points.
    pub fn prepare(input: &Input, window_options: &WindowOptions) -> Result<Self, Error> {
        let origin = centre(&input.points);
        let points: Vec<Xy> = input
            .points
            .iter()
            .map(|p| [p[0] - origin[0], p[1] - origin[1]])
            .collect();
        let shapes: Vec<NamedShape> = input
            .boundaries
            .iter()
            .map(|b| NamedShape {
                shape: b.shape.translate(-origin[0], -origin[1]),
                ..b.clone()
            })
            .collect();
        let mean_nn = nearest_distances(&points)
            .and_then(|d| mean(&d))
            .ok_or_else(|| {
                Error::refused(
                    Refusal::TooFewPoints,
                    input.subject.clone(),
                    format!("K needs at least two points, the file has {}", points.len()),
                    "check the point file",
                )
            })?;
        let (windows, notes) = build_windows(
            &points,
            mean_nn,
            &shapes,
            &WindowOptions {
                area: None,
                ..window_options.clone()
            },
        );
        Ok(Self {
            points,
            windows,
            notes,
            unit: input.summary.unit.clone(),
            subject: input.subject.clone(),
        })
    }

    /// The K audit in the windows the nearest-neighbour sweep was given
    /// ([`crate::frame`]), so they are built once. A window given by its
    /// area alone has no outline and is left out, as [`ScalesJob::prepare`]
    /// leaves it out.
    pub fn from_frame(input: &Input, frame: &Frame) -> Self {
        Self {
            points: frame.points.clone(),
            windows: frame
                .windows
                .iter()
                .filter(|w| w.kind != WindowKind::Area)
                .cloned()
                .collect(),
            notes: frame.notes.clone(),
            unit: input.summary.unit.clone(),
            subject: input.subject.clone(),
        }
    }

    /// Estimate and test. `check` sees the plan first (to forecast the
    /// time from [`Plan::simulated_patterns`] and [`Plan::trial_seconds`])
    /// and may stop the run by returning an error.
    pub fn run<E: From<Error>>(
        &self,
        options: &ScalesOptions,
        check: impl FnOnce(&Plan, &ScalesOptions) -> Result<(), E>,
        progress: &dyn Progress,
    ) -> Result<ScalesResult, E> {
        let plan = plan(&self.points, &self.windows, options);
        check(&plan, options)?;
        progress.start(
            plan.simulated_patterns(options) as u64,
            "simulating CSR for K",
        );
        let run = stoppable(&self.subject, || {
            plan.run(&self.unit, options, &ticker(progress))
        });
        progress.finish();
        let run = run?;
        if run.windows.is_empty() {
            let mut why: Vec<String> = self.notes.clone();
            why.extend(
                run.skipped
                    .iter()
                    .map(|s| format!("{}: {}", s.window, s.reason)),
            );
            return Err(Error::refused(
                Refusal::NoTestableWindow,
                self.subject.clone(),
                format!("no window could be analysed ({})", why.join("; ")),
                "the points are identical or collinear, so no study area can be drawn from them; give the surveyed outline with --boundary",
            )
            .into());
        }
        Ok(ScalesResult {
            run,
            notes: self.notes.clone(),
        })
    }
}

/// The K audit of `input` in every window of `window_options`.
///
/// ```
/// use geo::{MultiPolygon, Rect, coord};
/// use patternproof::{Correction, Input, ScalesOptions, Silent, WindowOptions, scales};
///
/// // A grid with spacing 10: no two points closer than 10, so K(r) = 0
/// // and L(r) − r = sqrt(K/π) − r = −r below 10 (Ripley 1977).
/// let points: Vec<[f64; 2]> = (0..100)
///     .map(|i| [5.0 + 10.0 * (i % 10) as f64, 5.0 + 10.0 * (i / 10) as f64])
///     .collect();
/// let square = Rect::new(coord! { x: 0.0, y: 0.0 }, coord! { x: 100.0, y: 100.0 });
/// let input = Input::from_points(points, "m")
///     .with_boundary("plot", MultiPolygon(vec![square.to_polygon()]));
/// let options = ScalesOptions { rmax: Some(9.0), steps: 3, sims: 19, ..ScalesOptions::default() };
///
/// let result = scales(&input, &WindowOptions::default(), &options, &Silent)?;
///
/// let outline = result.run.windows.iter().find(|w| w.id.starts_with("boundary")).expect("the outline");
/// let iso = outline.curves.iter().find(|c| c.correction == Correction::Isotropic).expect("isotropic");
/// assert_eq!(iso.l_minus_r, vec![Some(-3.0), Some(-6.0), Some(-9.0)]);
/// # Ok::<(), patternproof::Error>(())
/// ```
pub fn scales(
    input: &Input,
    window_options: &WindowOptions,
    options: &ScalesOptions,
    progress: &dyn Progress,
) -> Result<ScalesResult, Error> {
    ScalesJob::prepare(input, window_options)?.run(options, |_, _| Ok::<(), Error>(()), progress)
}
