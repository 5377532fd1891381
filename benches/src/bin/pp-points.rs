//! `pp-points uniform|thomas N SEED OUT.csv`: write seeded synthetic points
//! (see the `patternproof_benches` crate docs) as a CSV with header `x,y`.

use std::path::PathBuf;

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let usage = || -> ! {
        eprintln!("usage: pp-points uniform|thomas N SEED OUT.csv");
        std::process::exit(2);
    };
    if args.len() != 4 {
        usage();
    }
    let (Ok(n), Ok(seed)) = (args[1].parse::<usize>(), args[2].parse::<u64>()) else {
        usage();
    };
    let points = match args[0].as_str() {
        "uniform" => patternproof_benches::uniform(n, seed),
        "thomas" => patternproof_benches::thomas(n, seed),
        _ => usage(),
    };
    let out = PathBuf::from(&args[3]);
    if let Err(e) = patternproof_benches::write_csv(&out, &points) {
        eprintln!("pp-points: cannot write {}: {e}", out.display());
        std::process::exit(2);
    }
}
