//! Before a long run: does it fit in memory, and how long will it take?
//!
//! A simulation count is one number on the command line, and a typing slip
//! (`--sims 1000000000`) used to end in an allocation failure or a run that
//! never finished. So every command that simulates first estimates:
//!
//! - **memory**: the run's estimate (from the library's own accounting of
//!   what it holds, see `patternproof::cost::audit::run_bytes` and
//!   `patternproof::cost::scales`) must fit in the memory available now:
//!   `MemAvailable` of `/proc/meminfo`, or the cgroup limit when that is
//!   lower; where neither can be read, [`ASSUMED_BYTES`] is assumed and the
//!   message says so. Otherwise the run stops (exit 2) with the estimate,
//!   the memory available and the largest value of the flag that fits.
//! - **time**: a forecast from a short trial of the same work. Above
//!   [`SAY_AFTER`] seconds it is printed before the run starts, and the
//!   progress bar shows the time left. Above [`REFUSE_AFTER`] (seven days)
//!   the run stops (exit 2) with the forecast and the value that would take
//!   about a day: a week-long run is almost always a slip.

use crate::fail::Failure;

/// Memory assumed when the machine's cannot be read.
pub const ASSUMED_BYTES: u64 = 4 << 30;

/// Forecasts longer than this (seconds) are printed before the run.
pub const SAY_AFTER: f64 = 60.0;

/// Forecasts longer than this (seconds) are refused: seven days.
pub const REFUSE_AFTER: f64 = 7.0 * 86_400.0;

/// The memory a run may use.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Memory {
    /// Bytes.
    pub bytes: u64,
    /// Whether it was read from the machine (else [`ASSUMED_BYTES`]).
    pub measured: bool,
}

/// The memory available now: `MemAvailable`, lowered to the cgroup's
/// remaining allowance when a limit is set.
pub fn available_memory() -> Memory {
    let meminfo = std::fs::read_to_string("/proc/meminfo")
        .ok()
        .and_then(|t| mem_available(&t));
    let cgroup = cgroup_room();
    match (meminfo, cgroup) {
        (Some(m), Some(c)) => Memory {
            bytes: m.min(c),
            measured: true,
        },
        (Some(b), None) | (None, Some(b)) => Memory {
            bytes: b,
            measured: true,
        },
        (None, None) => Memory {
            bytes: ASSUMED_BYTES,
            measured: false,
        },
    }
}

/// `MemAvailable` in bytes from the text of `/proc/meminfo`.
fn mem_available(meminfo: &str) -> Option<u64> {
    let line = meminfo.lines().find(|l| l.starts_with("MemAvailable:"))?;
    let kib: u64 = line.split_whitespace().nth(1)?.parse().ok()?;
    kib.checked_mul(1024)
}

/// The room left under a cgroup (v2) memory limit, if one is set.
fn cgroup_room() -> Option<u64> {
    let read = |name: &str| -> Option<u64> {
        std::fs::read_to_string(format!("/sys/fs/cgroup/{name}"))
            .ok()?
            .trim()
            .parse()
            .ok()
    };
    let limit = read("memory.max")?;
    let used = read("memory.current").unwrap_or(0);
    Some(limit.saturating_sub(used))
}

/// The largest `v ≤ requested` with `need(v) ≤ room`, for a `need` that
/// grows with `v`; `None` when even 0 does not fit.
pub fn largest_fitting(requested: usize, room: u64, need: impl Fn(usize) -> u64) -> Option<usize> {
    if need(0) > room {
        return None;
    }
    let (mut lo, mut hi) = (0usize, requested);
    while lo < hi {
        let mid = lo + (hi - lo).div_ceil(2);
        if need(mid) <= room {
            lo = mid;
        } else {
            hi = mid - 1;
        }
    }
    Some(lo)
}

/// Stop, before anything runs, when `flag value` needs more memory than
/// `memory` holds. `need` gives the estimate for any value of the flag;
/// `basis` says in a few words what the estimate counts.
pub fn check_memory(
    flag: &str,
    value: usize,
    need: impl Fn(usize) -> u64,
    basis: &str,
    memory: Memory,
) -> Result<(), Failure> {
    let want = need(value);
    if want <= memory.bytes {
        return Ok(());
    }
    let available = if memory.measured {
        format!("{} is available", bytes(memory.bytes))
    } else {
        format!(
            "the available memory could not be read, so {} is assumed",
            bytes(memory.bytes)
        )
    };
    let todo = match largest_fitting(value, memory.bytes, &need) {
        Some(fits) => format!(
            "use at most {flag} {fits} (the largest value that fits), or run on a machine with more free memory"
        ),
        None => format!(
            "even {flag} 0 needs about {} (the points and the rest of the run), more than is available; run on a machine with more free memory",
            bytes(need(0))
        ),
    };
    Err(Failure::Input(format!(
        "{flag} {value}: the run needs about {} of memory ({basis}) and {available}\n  what to do: {todo}",
        bytes(want)
    )))
}

/// Say how long the run will take when it is long, or stop when it is
/// absurd. `seconds(v)` forecasts the run for `flag v` (linear in `v`);
/// `threads` is printed with the forecast.
pub fn check_time(
    flag: &str,
    value: usize,
    seconds: impl Fn(usize) -> f64,
    threads: usize,
    quiet: bool,
) -> Result<(), Failure> {
    let forecast = seconds(value);
    if !forecast.is_finite() || forecast <= SAY_AFTER {
        return Ok(());
    }
    let on = format!("on {threads} thread{}", if threads == 1 { "" } else { "s" });
    if forecast > REFUSE_AFTER {
        let per_unit = forecast / value.max(1) as f64;
        let in_a_day = (86_400.0 / per_unit).floor() as u64;
        return Err(Failure::Input(format!(
            "{flag} {value}: the run would take about {} {on} (forecast from a trial of the same work); runs forecast beyond {} are refused\n  what to do: lower {flag}: about {in_a_day} take a day here",
            duration(forecast),
            duration(REFUSE_AFTER)
        )));
    }
    if !quiet {
        eprintln!(
            "patternproof: this run will take about {} {on} (forecast from a trial of the same work); the progress bar shows the time left",
            duration(forecast)
        );
    }
    Ok(())
}

/// Windows with an outline that a sweep builds, and so simulates in: the
/// bounding box, the hull, the concave hull, one buffered hull per buffer
/// and the boundaries. An upper bound: a window that cannot be drawn is
/// left out later.
pub fn outlined_windows(buffers: usize, boundaries: usize) -> usize {
    3 + buffers + boundaries
}

/// Bytes in binary units with one decimal.
pub fn bytes(b: u64) -> String {
    const UNITS: [&str; 5] = ["bytes", "KiB", "MiB", "GiB", "TiB"];
    let mut v = b as f64;
    let mut unit = 0;
    while v >= 1024.0 && unit + 1 < UNITS.len() {
        v /= 1024.0;
        unit += 1;
    }
    if unit == 0 {
        format!("{b} bytes")
    } else {
        format!("{v:.1} {}", UNITS[unit])
    }
}

/// A duration in the largest unit that keeps it readable.
pub fn duration(seconds: f64) -> String {
    let s = seconds.max(0.0);
    if s < 90.0 {
        format!("{s:.0} s")
    } else if s < 90.0 * 60.0 {
        format!("{:.0} min", s / 60.0)
    } else if s < 48.0 * 3600.0 {
        format!("{:.1} h", s / 3600.0)
    } else if s < 365.0 * 86_400.0 {
        format!("{:.1} days", s / 86_400.0)
    } else {
        format!("{:.1} years", s / (365.25 * 86_400.0))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_mem_available() {
        let text = "MemTotal:       24000000 kB\nMemFree:  100 kB\nMemAvailable:   23919592 kB\n";
        assert_eq!(mem_available(text), Some(23_919_592 * 1024));
        assert_eq!(mem_available("MemTotal: 5 kB\n"), None);
    }

    /// The search finds the exact boundary of a linear estimate, and says
    /// when nothing fits.
    #[test]
    fn largest_fitting_value() {
        let need = |v: usize| 1_000 + 48 * v as u64;
        assert_eq!(
            largest_fitting(1_000_000_000, 1_000 + 48 * 777, need),
            Some(777)
        );
        assert_eq!(largest_fitting(5, 1 << 40, need), Some(5));
        assert_eq!(largest_fitting(5, 999, need), None);
        assert_eq!(
            largest_fitting(usize::MAX, u64::MAX, |v| v as u64),
            Some(usize::MAX)
        );
    }

    /// A refusal names the flag and value, the estimate, the memory and
    /// the largest value that fits, and says what to do.
    #[test]
    fn refusal_message() {
        let memory = Memory {
            bytes: 10 << 30,
            measured: true,
        };
        let need = |v: usize| (v as u64) * 1_240;
        assert!(check_memory("--sims", 999, need, "curves", memory).is_ok());
        let Err(Failure::Input(m)) = check_memory("--sims", 1_000_000_000, need, "curves", memory)
        else {
            panic!("refused")
        };
        let fits = (10u64 << 30) / 1_240;
        assert!(m.contains("--sims 1000000000"), "{m}");
        assert!(m.contains("1.1 TiB of memory (curves)"), "{m}");
        assert!(m.contains("10.0 GiB is available"), "{m}");
        assert!(m.contains(&format!("use at most --sims {fits} ")), "{m}");
        assert!(m.contains("what to do"), "{m}");
        let assumed = Memory {
            bytes: ASSUMED_BYTES,
            measured: false,
        };
        let Err(Failure::Input(m)) = check_memory("--sims", 1 << 30, need, "curves", assumed)
        else {
            panic!("refused")
        };
        assert!(
            m.contains("could not be read, so 4.0 GiB is assumed"),
            "{m}"
        );
        let Err(Failure::Input(m)) =
            check_memory("--sims", 5, |v| (1 << 40) + v as u64, "x", memory)
        else {
            panic!("refused")
        };
        assert!(m.contains("even --sims 0 needs about 1.0 TiB"), "{m}");
    }

    /// The time rule: quiet below a minute, printed up to seven days,
    /// refused beyond with the count that takes a day.
    #[test]
    fn time_rule() {
        let per_sim = |v: usize| v as f64 * 0.5;
        assert!(check_time("--sims", 100, per_sim, 2, true).is_ok());
        assert!(check_time("--sims", 1_000_000, per_sim, 2, true).is_ok());
        let Err(Failure::Input(m)) = check_time("--sims", 2_000_000, per_sim, 2, true) else {
            panic!("refused")
        };
        assert!(m.contains("about 11.6 days on 2 threads"), "{m}");
        assert!(m.contains("about 172800 take a day"), "{m}");
        assert!(m.contains("what to do"), "{m}");
    }

    #[test]
    fn units() {
        assert_eq!(bytes(512), "512 bytes");
        assert_eq!(bytes(3 << 29), "1.5 GiB");
        assert_eq!(duration(42.0), "42 s");
        assert_eq!(duration(600.0), "10 min");
        assert_eq!(duration(7_200.0), "2.0 h");
        assert_eq!(duration(3.0 * 86_400.0), "3.0 days");
        assert_eq!(duration(2.0 * 365.25 * 86_400.0), "2.0 years");
    }
}
