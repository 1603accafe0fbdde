//! `hadamard search`: run one of core's sequence searches, with a progress bar, checkpoints,
//! shards, and results printed as seed-catalogue lines.
//!
//! The search itself is `hadamard_core::search`; this command owns what core must not do: the
//! terminal (indicatif), the checkpoint file, Ctrl-C, and appending to the catalogue files.
//! Exit 0: the shard finished (whether or not it found anything; the summary says). Exit 3: it
//! was stopped (Ctrl-C or SIGTERM) before finishing; the checkpoint holds its state. Exit 2:
//! usage or I/O error, or (`search merge`) files that are not every shard of one search once.
//!
//! The size of a search has one name per meaning: `--length` is the length of every sequence
//! searched (Williamson's m, Golay's g, Goethals–Seidel's v; `--order` and `--v` are its old
//! spellings, still read), `--n` the parameter of the families BS(n+1, n) and TT(n), whose
//! sequences have different lengths.

use super::error::{json_location, CliError, Kind as Outcome};
use hadamard_core::construct::sequences::{to_text, GolayPair};
use hadamard_core::search::{
    self, aperiodic, goethals_seidel, williamson, Checkpoint, Hooks, RunConfig, Search, Shard,
};
use hadamard_core::seed::SeedCatalogue;
use indicatif::{ProgressBar, ProgressStyle};
use serde_json::json;
use std::collections::BTreeMap;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::time::Instant;

#[derive(clap::Args)]
pub struct SearchArgs {
    #[command(subcommand)]
    kind: Kind,
}

#[derive(clap::Subcommand)]
enum Kind {
    /// Williamson quadruples of odd length m (symmetric circulants, A²+B²+C²+D² = 4mI; order
    /// 4m).
    Williamson {
        /// The length m (odd) of each of the four circulant blocks.
        #[arg(long, alias = "order", value_name = "M")]
        length: usize,
        #[command(flatten)]
        what: What,
        #[command(flatten)]
        common: Common,
    },
    /// Golay pairs of length g by backtracking (practical to about g = 34), or with
    /// `--products` every length 2^a·10^b·26^c up to `--max-length` by Turyn's product and
    /// Golay's doubling from the catalogue's pairs.
    Golay {
        /// The length g to search.
        #[arg(long, value_name = "G", required_unless_present = "products")]
        length: Option<usize>,
        /// Build the longer lengths from the pairs already in the seed catalogue.
        #[arg(long)]
        products: bool,
        /// With --products: the longest length to build.
        #[arg(long, default_value_t = 500)]
        max_length: usize,
        #[command(flatten)]
        what: What,
        #[command(flatten)]
        common: Common,
    },
    /// Base sequences BS(n+1, n): T-sequences of length 2n+1, order 4(2n+1).
    Base {
        /// The parameter n (C and D have length n; A and B have length n+1).
        #[arg(long)]
        n: usize,
        #[command(flatten)]
        what: What,
        #[command(flatten)]
        common: Common,
    },
    /// Turyn-type sequences TT(n): BS(2n−1, n), T-sequences of length 3n−1, order 4(3n−1).
    Turyn {
        /// The parameter n (A, B, C of length n, D of length n−1).
        #[arg(long)]
        n: usize,
        #[command(flatten)]
        what: What,
        #[command(flatten)]
        common: Common,
    },
    /// Goethals–Seidel quadruples: four ±1 sequences of length v, periodic autocorrelations
    /// summing to 0; order 4v. Every one for v ≤ 40; with --multiplier, those fixed by a group
    /// of multipliers, for much longer v (symmetric ones are reported as Williamson quadruples).
    Gs {
        /// The length v of each of the four sequences.
        #[arg(long, alias = "v", value_name = "V")]
        length: usize,
        /// Search only sequences fixed by the multipliers ⟨G⟩ mod v (aᵢ = a_{Gi}); `G,G2` for the
        /// group two multipliers generate. Without it, v > 40 lists the groups there are.
        #[arg(long, value_name = "G", value_delimiter = ',')]
        multiplier: Option<Vec<usize>>,
        /// With --multiplier: the type of each of the four blocks, e.g. `sym,sym,sym,any`:
        /// `sym` (aₓ = a₋ₓ), `skew` (a₀ = +1, a₋ₓ = −aₓ; a skew first block gives a
        /// skew-Hadamard matrix) or `any`. Also when −1 is not a multiplier. Only one quadruple
        /// per class under the other multipliers is tried.
        #[arg(long, value_name = "T,T,T,T", requires = "multiplier")]
        types: Option<String>,
        #[command(flatten)]
        what: What,
        #[command(flatten)]
        common: Common,
    },
    /// Combine the outputs of several shards (or runs): the union, one line per result.
    Merge {
        /// Files written by `hadamard search ... --json` or its text output (seed lines).
        files: Vec<PathBuf>,
        /// Print a JSON object instead of seed lines.
        #[arg(long)]
        json: bool,
        /// Also append the results that are not there yet to this seed-catalogue file.
        #[arg(long)]
        append_to: Option<PathBuf>,
        /// Take the union of any files, without checking that they are exactly the shards
        /// 0/k … (k−1)/k of one search, each once and finished.
        #[arg(long)]
        unchecked: bool,
    },
}

/// What to report.
#[derive(clap::Args)]
struct What {
    /// Report one representative per equivalence class (Williamson and Turyn-type), running to
    /// the end.
    #[arg(long, conflicts_with_all = ["all", "limit"])]
    classes: bool,
    /// Report every (normalised) solution, running to the end.
    #[arg(long, conflicts_with = "limit")]
    all: bool,
    /// Stop after the first batch that brings the number of results to at least N.
    #[arg(long, default_value_t = 1)]
    limit: usize,
}

/// Options every search takes.
#[derive(clap::Args)]
struct Common {
    /// Run only shard i of k (0 ≤ i < k): shards are disjoint and together are the whole search.
    #[arg(long, default_value = "0/1")]
    shard: Shard,
    /// Keep the state in this JSON file: resume from it if it exists, save it after every batch.
    #[arg(long)]
    checkpoint: Option<PathBuf>,
    /// Units per batch (checkpoint and progress granularity; part of a limited run's identity).
    #[arg(long, default_value_t = hadamard_core::search::DEFAULT_BATCH)]
    batch: usize,
    /// Print one JSON object on stdout instead of seed lines.
    #[arg(long)]
    json: bool,
    /// Also append the results that are not there yet to this seed-catalogue file.
    #[arg(long)]
    append_to: Option<PathBuf>,
    /// No progress bar.
    #[arg(long)]
    quiet: bool,
}

static STOP: AtomicBool = AtomicBool::new(false);

impl SearchArgs {
    /// Whether `--json` was given (then a failure is a JSON object on stdout too).
    pub fn json(&self) -> bool {
        match &self.kind {
            Kind::Williamson { common, .. }
            | Kind::Golay { common, .. }
            | Kind::Base { common, .. }
            | Kind::Turyn { common, .. }
            | Kind::Gs { common, .. } => common.json,
            Kind::Merge { json, .. } => *json,
        }
    }
}

pub fn run(args: SearchArgs) -> Result<Outcome, CliError> {
    let command = provenance_command(std::env::args().skip(1));
    match args.kind {
        Kind::Williamson {
            length: order,
            what,
            common,
        } => {
            if order % 2 == 0 || order > 127 {
                return Err(CliError::usage("--length must be odd and at most 127"));
            }
            let mode = if what.classes {
                williamson::Mode::Classes
            } else {
                williamson::Mode::Solutions
            };
            let s = williamson::WilliamsonSearch::new(order, mode, true);
            drive(&s, &what, &common, &command)
        }
        Kind::Golay {
            length,
            products,
            max_length,
            what,
            common,
        } => {
            if products {
                return golay_products(max_length, &common, &command);
            }
            let g = length.unwrap_or(0);
            let s = aperiodic::AperiodicSearch::new(
                aperiodic::Family::Golay(g),
                aperiodic::Mode::Solutions,
            );
            drive(&s, &what, &common, &command)
        }
        Kind::Base { n, what, common } => {
            let s = aperiodic::AperiodicSearch::new(
                aperiodic::Family::Base(n),
                aperiodic::Mode::Solutions,
            );
            drive(&s, &what, &common, &command)
        }
        Kind::Turyn { n, what, common } => {
            let mode = if what.classes {
                aperiodic::Mode::Classes
            } else {
                aperiodic::Mode::Solutions
            };
            let s = aperiodic::AperiodicSearch::new(aperiodic::Family::Turyn(n), mode);
            drive(&s, &what, &common, &command)
        }
        Kind::Gs {
            length: v,
            multiplier,
            types,
            what,
            common,
        } => {
            let typed = match types
                .as_deref()
                .map(goethals_seidel::parse_types)
                .transpose()
            {
                Ok(t) => t,
                Err(e) => return Err(CliError::usage(format!("--types: {e}"))),
            };
            let s = match multiplier {
                Some(g) => match match typed {
                    Some(t) => goethals_seidel::GsSearch::with_types(v, &g, t),
                    None => goethals_seidel::GsSearch::with_multipliers(v, &g),
                } {
                    Ok(s) => s,
                    Err(e) => return Err(CliError::usage(e.to_string())),
                },
                None if (1..=40).contains(&v) => goethals_seidel::GsSearch::new(v),
                None => {
                    let mut msg = format!("--length {v} is too long to search every sequence (at most 40); choose --multiplier G, one of:");
                    // Groups with more orbits are listed too when −1 is not in them: a search
                    // whose blocks are all `sym` or `skew` has one sign per pair of orbits.
                    let max = goethals_seidel::MAX_ORBITS;
                    let choices: Vec<_> = goethals_seidel::multiplier_choices(v, 2 * max + 1)
                        .into_iter()
                        .filter(|(gens, _, orbits)| {
                            *orbits <= max
                                || !goethals_seidel::generated_group(v, gens).contains(&(v - 1))
                        })
                        .collect();
                    if choices.is_empty() {
                        msg += &format!(
                            "\n  (none: every group of multipliers mod {v} has more than {max} orbits)"
                        );
                    }
                    for (gens, size, orbits) in choices {
                        let g: Vec<String> = gens.iter().map(|g| g.to_string()).collect();
                        let note = if orbits <= max {
                            format!("(2^{orbits} sequences)")
                        } else {
                            "(only with --types of sym and skew blocks)".to_string()
                        };
                        msg += &format!(
                            "\n  --multiplier {:<9} a group of {size} multipliers, {orbits} orbits {note}",
                            g.join(",")
                        );
                    }
                    return Err(CliError::usage(msg));
                }
            };
            drive(&s, &what, &common, &command)
        }
        Kind::Merge {
            files,
            json,
            append_to,
            unchecked,
        } => merge(&files, json, append_to.as_deref(), unchecked),
    }
}

/// An option as the provenance spells it: the old names of `--length` (`--order`, `--v`) under
/// their current name, so the same search is stated the same way however it was typed.
fn canonical_option(a: &str) -> String {
    let (name, value) = match a.split_once('=') {
        Some((n, v)) => (n, Some(v)),
        None => (a, None),
    };
    let name = match name {
        "--order" | "--v" => "--length",
        other => other,
    };
    match value {
        Some(v) => format!("{name}={v}"),
        None => name.to_owned(),
    }
}

/// The command line as the provenance states it: the search and its parameters, without the
/// options that only say where output and state go (the shard is stated separately).
fn provenance_command(args: impl Iterator<Item = String>) -> String {
    const WITH_VALUE: [&str; 3] = ["--checkpoint", "--append-to", "--shard"];
    const FLAGS: [&str; 2] = ["--json", "--quiet"];
    let mut kept = vec!["hadamard".to_string()];
    let mut skip_next = false;
    for a in args {
        if std::mem::take(&mut skip_next) {
            continue;
        }
        let name = a.split('=').next().unwrap_or("");
        if WITH_VALUE.contains(&name) {
            skip_next = !a.contains('=');
            continue;
        }
        if FLAGS.contains(&a.as_str()) {
            continue;
        }
        kept.push(canonical_option(&a));
    }
    kept.join(" ")
}

fn watch_ctrl_c() {
    // The first Ctrl-C asks the search to stop at the end of its batch (a checkpoint is then
    // written); the second quits at once.
    static PRESSED: AtomicUsize = AtomicUsize::new(0);
    let _ = ctrlc::set_handler(|| {
        if PRESSED.fetch_add(1, Ordering::SeqCst) == 0 {
            eprintln!("\nstopping at the end of this batch (Ctrl-C again to quit now)");
            STOP.store(true, Ordering::SeqCst);
        } else {
            std::process::exit(Outcome::Interrupted.exit_status().into());
        }
    });
    watch_sigterm();
}

/// SIGTERM (a scheduler's preemption, requeue or cancel; `kill`) also stops the search at the
/// end of its batch. Unlike Ctrl-C, a repeated SIGTERM does not quit at once: a scheduler may
/// send it to every process of the job and a job script may forward it again; the scheduler's
/// SIGKILL is the hard stop.
#[cfg(unix)]
fn watch_sigterm() {
    extern "C" fn on_term(_: libc::c_int) {
        if !STOP.swap(true, Ordering::SeqCst) {
            // Only async-signal-safe calls here: one write(2) to stderr.
            let msg = b"\nterminated: stopping at the end of this batch\n";
            // SAFETY: write(2) of a static buffer to fd 2 is async-signal-safe.
            unsafe {
                libc::write(2, msg.as_ptr().cast(), msg.len());
            }
        }
    }
    // SAFETY: the handler only touches an atomic and calls write(2).
    unsafe {
        libc::signal(
            libc::SIGTERM,
            on_term as extern "C" fn(libc::c_int) as libc::sighandler_t,
        );
    }
}

#[cfg(not(unix))]
fn watch_sigterm() {}

fn load_checkpoint(path: &Path) -> Result<Option<Checkpoint>, CliError> {
    match std::fs::read_to_string(path) {
        Ok(text) => serde_json::from_str(&text).map(Some).map_err(|e| {
            let what = e.to_string();
            let what = what.split(" at line ").next().unwrap_or(&what);
            CliError::at(
                Outcome::Malformed,
                json_location(&e),
                &format!("not a search checkpoint: {what}"),
            )
            .in_file(&path.display().to_string())
        }),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => Ok(None),
        Err(e) => Err(CliError::unreadable(format!("{}: {e}", path.display()))),
    }
}

fn save_checkpoint(path: &Path, c: &Checkpoint) -> std::io::Result<()> {
    let tmp = path.with_extension("json.tmp");
    std::fs::write(&tmp, serde_json::to_vec_pretty(c)?)?;
    std::fs::rename(tmp, path)
}

fn drive<S: Search>(
    s: &S,
    what: &What,
    common: &Common,
    command: &str,
) -> Result<Outcome, CliError> {
    let resume = common
        .checkpoint
        .as_deref()
        .map(load_checkpoint)
        .transpose()?
        .flatten();
    if let (Some(c), Some(p)) = (&resume, &common.checkpoint) {
        eprintln!(
            "resuming from {}: {}/{} units of shard {} done, {} result(s) so far",
            p.display(),
            c.next,
            c.total,
            c.shard,
            c.results.len()
        );
    }
    let limit = (!what.classes && !what.all).then_some(what.limit.max(1));
    let config = RunConfig {
        shard: common.shard,
        limit,
        batch: common.batch,
    };
    let bar = if common.quiet {
        ProgressBar::hidden()
    } else {
        ProgressBar::new(0)
    };
    bar.set_style(ProgressStyle::with_template("{spinner} [{elapsed_precise}] {wide_bar} {pos}/{len} units  {per_sec}  ETA {eta}  {msg}").unwrap_or_else(|_| ProgressStyle::default_bar()));
    watch_ctrl_c();
    let progress = |done: u64, total: u64| {
        bar.set_length(total);
        bar.set_position(done);
    };
    let mut save_error = None;
    let mut save = |c: &Checkpoint| {
        bar.set_message(format!("{} found", c.results.len()));
        if let Some(p) = &common.checkpoint {
            if let Err(e) = save_checkpoint(p, c) {
                save_error.get_or_insert(e.to_string());
            }
        }
    };
    let start = Instant::now();
    let state = match search::run(
        s,
        config,
        resume,
        Hooks {
            progress: &progress,
            checkpoint: &mut save,
            stop: &STOP,
        },
    ) {
        Ok(st) => st,
        Err(e) => {
            bar.abandon();
            return Err(CliError::usage(e.to_string()));
        }
    };
    bar.finish_and_clear();
    if let Some(e) = save_error {
        eprintln!("warning: could not save the checkpoint: {e}");
    }
    let elapsed = start.elapsed().as_secs_f64();
    let provenance = format!(
        "found by {command} (shard {}); {}",
        common.shard,
        crate::time::today()
    );
    let lines: Vec<String> = state
        .results
        .iter()
        .map(|r| format!("{r} | {provenance}"))
        .collect();
    if let Some(bad) = first_rejected(&lines) {
        return Err(CliError::internal(format!(
            "a result failed its identity (a bug in the search): {bad}"
        )));
    }
    if common.json {
        let v = json!({
            "search": state.search,
            "shard": common.shard.to_string(),
            "finished": state.finished,
            "units_done": state.next,
            "units_total": state.total,
            "elapsed_s": elapsed,
            "results": lines,
        });
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        for l in &lines {
            println!("{l}");
        }
    }
    eprintln!(
        "{}: {} result(s), {}/{} units of shard {} in {elapsed:.1} s{}",
        state.search,
        lines.len(),
        state.next,
        state.total,
        common.shard,
        if state.finished {
            ""
        } else {
            " (stopped: resume with the same --checkpoint)"
        }
    );
    append_to(common.append_to.as_deref(), &lines)?;
    Ok(if state.finished {
        Outcome::Done
    } else {
        Outcome::Stopped
    })
}

/// `--append-to`: appends the new lines to the file, if one is named.
fn append_to(path: Option<&Path>, lines: &[String]) -> Result<(), CliError> {
    match path {
        Some(p) => append_new(p, lines).map_err(|e| CliError::io(format!("{}: {e}", p.display()))),
        None => Ok(()),
    }
}

/// The first line that the seed parser rejects, if any.
fn first_rejected(lines: &[String]) -> Option<String> {
    let mut cat = SeedCatalogue::default();
    cat.add_text("result", &lines.join("\n"));
    cat.rejected.first().map(|(_, m)| m.clone())
}

/// The data part of a seed line (before `|`), trimmed.
fn data_part(line: &str) -> &str {
    line.split_once('|').map_or(line, |(d, _)| d).trim()
}

/// Appends the lines whose data is not in the file yet.
fn append_new(path: &Path, lines: &[String]) -> std::io::Result<()> {
    let existing = std::fs::read_to_string(path).unwrap_or_default();
    let known: std::collections::HashSet<&str> = existing.lines().map(data_part).collect();
    let mut f = std::fs::OpenOptions::new()
        .create(true)
        .append(true)
        .open(path)?;
    let mut added = 0;
    for l in lines {
        if !known.contains(data_part(l)) {
            writeln!(f, "{l}")?;
            added += 1;
        }
    }
    eprintln!("{}: {added} new line(s) appended", path.display());
    Ok(())
}

/// One input of `search merge`: its result lines and what it says about the run it came from.
struct ShardOutput {
    path: PathBuf,
    lines: Vec<String>,
    /// The search: core's description in a `--json` output, else the command in the
    /// provenance of its lines. `None` when the file does not say.
    search: Option<String>,
    shard: Option<Shard>,
    /// From a `--json` output: whether the shard ran to its end, and its units done / total.
    finished: Option<(bool, u64, u64)>,
    /// Its lines name more than one search or shard (a merged file, or files concatenated).
    mixed: bool,
}

/// The search command and shard that a result line's provenance names: `... | found by CMD
/// (shard i/k); DATE`.
fn provenance_shard(line: &str) -> Option<(String, Shard)> {
    let (_, prov) = line.split_once('|')?;
    let prov = prov.trim();
    let rest = prov.strip_prefix("found by ")?;
    let at = rest.rfind(" (shard ")?;
    // Lines written before `--length` was the one name are read as if written after.
    let command = rest[..at]
        .split(' ')
        .map(canonical_option)
        .collect::<Vec<_>>()
        .join(" ");
    let tail = &rest[at + " (shard ".len()..];
    let shard = tail.split_once(')')?.0.parse().ok()?;
    Some((command, shard))
}

fn read_shard_output(path: &Path) -> Result<ShardOutput, String> {
    let text = std::fs::read_to_string(path).map_err(|e| format!("{}: {e}", path.display()))?;
    let mut out = ShardOutput {
        path: path.to_path_buf(),
        lines: Vec::new(),
        search: None,
        shard: None,
        finished: None,
        mixed: false,
    };
    match serde_json::from_str::<serde_json::Value>(&text) {
        Ok(v) => {
            out.lines = v["results"]
                .as_array()
                .map(|a| {
                    a.iter()
                        .filter_map(|x| x.as_str().map(String::from))
                        .collect()
                })
                .unwrap_or_default();
            out.search = v["search"].as_str().map(String::from);
            out.shard = v["shard"].as_str().and_then(|s| s.parse().ok());
            if let (Some(f), Some(d), Some(t)) = (
                v["finished"].as_bool(),
                v["units_done"].as_u64(),
                v["units_total"].as_u64(),
            ) {
                out.finished = Some((f, d, t));
            }
        }
        Err(_) => {
            out.lines = text
                .lines()
                .map(str::trim)
                .filter(|l| !l.is_empty() && !l.starts_with('#'))
                .map(String::from)
                .collect()
        }
    }
    if out.search.is_none() || out.shard.is_none() {
        // A text output (or a `--json` merge output): the provenance of the lines says it.
        let mut named = out.lines.iter().map(|l| provenance_shard(l));
        if let Some(first) = named.next() {
            if named.any(|n| n != first) {
                out.mixed = true;
            } else if let Some((command, shard)) = first {
                out.search = Some(command);
                out.shard = Some(shard);
            }
        }
    }
    Ok(out)
}

/// Checks that `outputs` are the shards 0/k … (k−1)/k of one search, each exactly once and
/// finished, so that their union is the whole search. Returns every problem found.
fn check_complete(outputs: &[ShardOutput]) -> Vec<String> {
    let mut problems = Vec::new();
    if outputs.is_empty() {
        problems.push("no shard outputs given".to_string());
        return problems;
    }
    let mut first: Option<(&ShardOutput, &str, Shard)> = None;
    let mut seen: BTreeMap<u64, &Path> = BTreeMap::new();
    for o in outputs {
        let p = o.path.display();
        if o.mixed {
            problems.push(format!(
                "{p}: its lines come from more than one search or shard (a merged file?)"
            ));
            continue;
        }
        let (Some(search), Some(shard)) = (o.search.as_deref(), o.shard) else {
            problems.push(format!(
                "{p}: does not say which search and shard it is (no results, and not a --json output of `hadamard search`)"
            ));
            continue;
        };
        if let Some((f, fs, fshard)) = first {
            if search != fs {
                problems.push(format!(
                    "{p}: is from `{search}`, but {} is from `{fs}`",
                    f.path.display()
                ));
                continue;
            }
            if shard.count != fshard.count {
                problems.push(format!(
                    "{p}: is shard {shard}, but {} is shard {fshard}: different shard counts",
                    f.path.display()
                ));
                continue;
            }
        } else {
            first = Some((o, search, shard));
        }
        if let Some((false, done, total)) = o.finished {
            problems.push(format!(
                "{p}: shard {shard} is unfinished ({done}/{total} units); resume it with its --checkpoint"
            ));
        }
        if let Some(other) = seen.insert(shard.index, &o.path) {
            problems.push(format!(
                "shard {shard} is given twice: {} and {p}",
                other.display()
            ));
        }
    }
    if let Some((_, _, fshard)) = first {
        let missing: Vec<String> = (0..fshard.count)
            .filter(|i| !seen.contains_key(i))
            .map(|i| format!("{i}/{}", fshard.count))
            .collect();
        if !missing.is_empty() {
            problems.push(format!(
                "shard(s) {} missing: the union would not be the whole search",
                missing.join(", ")
            ));
        }
    }
    problems
}

fn merge(
    files: &[PathBuf],
    json: bool,
    append: Option<&Path>,
    unchecked: bool,
) -> Result<Outcome, CliError> {
    let mut outputs = Vec::new();
    for f in files {
        outputs.push(read_shard_output(f).map_err(CliError::unreadable)?);
    }
    if !unchecked {
        let problems = check_complete(&outputs);
        if !problems.is_empty() {
            let mut msg = "refusing to merge: the files must be the shards 0/k … (k−1)/k of one search, each once and finished (--unchecked merges them anyway):".to_string();
            for p in &problems {
                msg += &format!("\n  {p}");
            }
            return Err(CliError::usage(msg).with("problems", &problems));
        }
    }
    // Keyed by the data part, so the same result from two shards appears once (with the
    // provenance of the first file that has it).
    let mut all: BTreeMap<String, String> = BTreeMap::new();
    for o in outputs {
        for l in o.lines {
            all.entry(data_part(&l).to_string()).or_insert(l);
        }
    }
    let lines: Vec<String> = all.into_values().collect();
    if let Some(bad) = first_rejected(&lines) {
        return Err(CliError::new(
            Outcome::Malformed,
            format!("an input line is not a valid seed entry: {bad}"),
        ));
    }
    print_results(&lines, json);
    eprintln!(
        "merged {} file(s): {} distinct result(s)",
        files.len(),
        lines.len()
    );
    append_to(append, &lines)?;
    Ok(Outcome::Done)
}

/// Every Golay length 2^a·10^b·26^c ≤ `max` reachable from the catalogue's pairs by Turyn's
/// product and doubling, shortest construction first.
fn golay_products(max: usize, common: &Common, command: &str) -> Result<Outcome, CliError> {
    let cat = hadamard_core::seed::embedded();
    let mut known: BTreeMap<usize, (GolayPair, String)> = BTreeMap::new();
    for e in &cat.golay {
        known.entry(e.data.len()).or_insert((
            e.data.clone(),
            format!("the catalogue pair of length {}", e.data.len()),
        ));
    }
    let seeds: Vec<usize> = known.keys().copied().collect();
    let mut built: Vec<(GolayPair, String)> = Vec::new();
    loop {
        let lens: Vec<usize> = known.keys().copied().collect();
        let mut added = false;
        for &x in &lens {
            for &y in &seeds {
                let n = x * y;
                if n > max || known.contains_key(&n) || y < 2 || x < 2 {
                    continue;
                }
                if let Some(g) = aperiodic::golay_product(&known[&x].0, &known[&y].0) {
                    let how = format!("Turyn's product of the pairs of lengths {x} and {y}");
                    built.push((g.clone(), how.clone()));
                    known.insert(n, (g, how));
                    added = true;
                }
            }
        }
        if !added {
            break;
        }
    }
    let date = crate::time::today();
    let lines: Vec<String> = built
        .iter()
        .map(|(g, how)| {
            format!(
                "golay g={} a={} b={} | built by {command}: {how}; {date}",
                g.len(),
                to_text(&g.a),
                to_text(&g.b)
            )
        })
        .collect();
    if let Some(bad) = first_rejected(&lines) {
        return Err(CliError::internal(format!(
            "a product failed the identity (a bug): {bad}"
        )));
    }
    print_results(&lines, common.json);
    eprintln!("built {} Golay pair(s) of new lengths ≤ {max}", lines.len());
    append_to(common.append_to.as_deref(), &lines)?;
    Ok(Outcome::Done)
}

/// Prints result lines: one seed-catalogue line each, or `{"results": [...]}` with `--json`.
fn print_results(lines: &[String], json: bool) {
    if json {
        println!(
            "{}",
            serde_json::to_string_pretty(&json!({ "results": lines })).unwrap_or_default()
        );
    } else {
        for l in lines {
            println!("{l}");
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn output(name: &str, search: &str, shard: &str, finished: bool) -> ShardOutput {
        ShardOutput {
            path: PathBuf::from(name),
            lines: Vec::new(),
            search: Some(search.to_string()),
            shard: shard.parse().ok(),
            finished: Some((finished, if finished { 10 } else { 3 }, 10)),
            mixed: false,
        }
    }

    #[test]
    fn the_old_size_names_still_parse_and_are_stated_under_the_new_one() {
        use clap::Parser;
        #[derive(Parser)]
        struct T {
            #[command(subcommand)]
            kind: Kind,
        }
        let size = |args: &[&str]| match T::try_parse_from(args).expect("parses").kind {
            Kind::Williamson { length, .. } | Kind::Gs { length, .. } => length,
            _ => unreachable!("only the searches with a length are parsed here"),
        };
        for (old, new) in [("--order", "williamson"), ("--v", "gs")] {
            assert_eq!(size(&["t", new, old, "23"]), 23, "{new} {old}");
            assert_eq!(size(&["t", new, "--length", "23"]), 23, "{new} --length");
        }
        let args = |s: &str| {
            s.split(' ')
                .map(String::from)
                .collect::<Vec<_>>()
                .into_iter()
        };
        for typed in [
            "search gs --v 67 --multiplier 29 --json --shard 1/4",
            "search gs --length 67 --multiplier 29",
            "search gs --length=67 --quiet --multiplier 29",
        ] {
            let stated = provenance_command(args(typed));
            assert!(
                stated == "hadamard search gs --length 67 --multiplier 29"
                    || stated == "hadamard search gs --length=67 --multiplier 29",
                "{typed}: {stated}"
            );
        }
        let old = "williamson m=5 a=+ | found by hadamard search williamson --order 5 (shard 0/1); 2026-12-03";
        assert_eq!(
            provenance_shard(old).map(|p| p.0).as_deref(),
            Some("hadamard search williamson --length 5")
        );
    }

    #[test]
    fn the_provenance_names_the_command_and_the_shard() {
        let line = "turyn n=2 a=++ b=+- c=++ d=+ | found by hadamard search turyn --n 2 (shard 1/3); 2026-12-03";
        assert_eq!(
            provenance_shard(line),
            Some((
                "hadamard search turyn --n 2".to_string(),
                Shard { index: 1, count: 3 }
            ))
        );
        assert_eq!(provenance_shard("turyn n=2 a=++ b=+- c=++ d=+"), None);
    }

    #[test]
    fn merge_accepts_only_every_shard_once_and_finished() {
        let s = "turyn n=12 mode=classes";
        let whole = |extra: Vec<ShardOutput>| {
            let mut v: Vec<ShardOutput> = (0..3)
                .map(|i| output(&format!("s{i}"), s, &format!("{i}/3"), true))
                .collect();
            v.extend(extra);
            v
        };
        assert!(check_complete(&whole(vec![])).is_empty());
        // Lost: shard 2/3 missing.
        let lost = check_complete(&whole(vec![])[..2]);
        assert_eq!(lost.len(), 1);
        assert!(lost[0].contains("2/3 missing"), "{lost:?}");
        // Duplicated.
        let twice = check_complete(&whole(vec![output("again", s, "1/3", true)]));
        assert!(twice.iter().any(|p| p.contains("shard 1/3 is given twice")));
        // Unfinished, another search, another shard count, unidentified.
        let mut v = whole(vec![]);
        v[1] = output("s1", s, "1/3", false);
        assert!(check_complete(&v)[0].contains("unfinished"));
        let other = check_complete(&whole(vec![output("w", "williamson m=5", "0/3", true)]));
        assert!(other[0].contains("is from `williamson m=5`"));
        let k = check_complete(&whole(vec![output("k", s, "3/4", true)]));
        assert!(k[0].contains("different shard counts"));
        let mut anon = output("anon", s, "0/3", true);
        anon.search = None;
        assert!(check_complete(&[anon])[0].contains("does not say"));
        assert!(!check_complete(&[]).is_empty());
    }
}
