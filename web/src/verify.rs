//! Verification in the browser, and publishing to the catalogue.
//!
//! The file is read and checked here, by `core` compiled to WebAssembly: nothing leaves the
//! machine until the person presses "Publish". A large matrix (order 2048 and up) is checked by
//! a pool of Web Workers, one per core ([`crate::pool`]), whose shares core merges into the
//! report; the page only posts messages and moves the progress bar. Smaller matrices, and
//! browsers where workers cannot start, are checked on the page in slices
//! ([`hadamard_core::verify::Progressive`]) with a turn of the event loop between them, each
//! slice sized to take about 25 ms, so the page keeps answering either way. The verdict is
//! core's ([`hadamard_core::diagnose`], as in the CLI and the API): a matrix with erased
//! entries is incomplete until they are known, else the wrong signs that explain a failure are
//! looked for; a malformed input gets core's own message with its line and column.

use crate::api::{self, next_tick, now_ms};
use crate::entry::EquivalenceResult;
use crate::picture::MatrixPicture;
use crate::pool;
use hadamard_core::diagnose::{self, diagnose};
use hadamard_core::formats::{self, Format, ReadOptions};
use hadamard_core::repair::{Completion, CompletionLimits, CompletionReport, Proof};
use hadamard_core::verify::{Failure, Progressive, Report};
use hadamard_core::wire::UploadAnswer;
use hadamard_core::Matrix;
use leptos::prelude::*;
use leptos::task::spawn_local;
use std::sync::Arc;
use wasm_bindgen_futures::JsFuture;

/// How many failing pairs the report keeps (the total is always exact).
const PAIR_CAP: usize = 64;
/// How many of them the page lists.
const PAIRS_SHOWN: usize = 12;
/// The time one slice of the check aims for, in milliseconds.
const SLICE_MS: f64 = 25.0;

/// Sylvester's matrix of order 8, for the "try an example" button.
const EXAMPLE: &str =
    "++++++++\n+-+-+-+-\n++--++--\n+--++--+\n++++----\n+-+--+-+\n++----++\n+--+-++-\n";

/// The input, as the person gave it: these exact bytes are what "Publish" sends.
#[derive(Clone)]
struct Source {
    bytes: Arc<Vec<u8>>,
    name: String,
}

/// A repair the check found, with the corrected matrix.
#[derive(Clone)]
enum Fix {
    /// Wrong signs, 0-based; `unique`: no other Hadamard matrix is as near.
    Signs {
        entries: Vec<(usize, usize)>,
        id: String,
        corrected: Arc<Matrix>,
        unique: bool,
    },
    /// The erased entries have exactly one Hadamard completion.
    Completed { id: String, corrected: Arc<Matrix> },
}

/// Everything the check found.
#[derive(Clone)]
struct Outcome {
    report: Arc<Report>,
    /// Core's verdict on the matrix as read.
    verdict: diagnose::Verdict,
    format: Format,
    erasures: usize,
    /// Bit set at the erased entries.
    unknown: Option<Arc<Matrix>>,
    completion: Option<String>,
    fix: Option<Fix>,
    matrix: Arc<Matrix>,
    marked: Vec<usize>,
    /// Time to read the input, and to check it, in milliseconds.
    read_ms: f64,
    millis: f64,
    /// How many Web Workers checked it (0: the page itself), and the time they spent on it in
    /// all, in milliseconds.
    workers: usize,
    workers_ms: f64,
}

#[derive(Clone)]
enum Phase {
    Idle,
    Reading,
    Checking(f64),
    Done(Outcome),
    Malformed(String),
}

#[derive(Clone)]
enum Publish {
    Idle,
    Sending,
    Stored {
        id: String,
        url: String,
        existed: bool,
        similar: Vec<String>,
        note: Option<String>,
    },
    Refused(String),
}

/// Which rows to point out: the one row every listed pair shares, else every listed row.
fn marked_rows(r: &Report) -> Vec<usize> {
    let pairs = &r.failing_pairs;
    let Some(first) = pairs.first() else {
        return Vec::new();
    };
    for c in [first.i, first.j] {
        if pairs.len() > 1 && pairs.iter().all(|p| p.i == c || p.j == c) {
            return vec![c];
        }
    }
    let mut rows: Vec<usize> = pairs.iter().flat_map(|p| [p.i, p.j]).collect();
    rows.sort_unstable();
    rows.dedup();
    rows
}

fn completion_words(c: &CompletionReport) -> String {
    let fixed = format!(
        "{} of the {} were fixed by the linear equations of orthogonality",
        c.determined, c.erased
    );
    match &c.outcome {
        Completion::Unique { proof, .. } => format!(
            "Orthogonality fixes the erased entries (?): exactly one way of filling them gives a Hadamard matrix ({fixed}{}).",
            if *proof == Proof::Search { ", the rest by an exhaustive search" } else { "" }
        ),
        Completion::None => "No way of filling the erased entries (?) gives a Hadamard matrix.".into(),
        Completion::Several { count, complete, examples } => format!(
            "The erased entries (?) can be filled in {}{count} ways that give a Hadamard matrix, for example ids {}.",
            if *complete { "" } else { "at least " },
            examples.iter().map(|v| v.id().to_string()).collect::<Vec<_>>().join(" and ")
        ),
        Completion::Undecided { remaining, candidate, .. } => format!(
            "Not settled within the search limit: {fixed}, and {} are still unknown{}.",
            remaining.len(),
            candidate.as_ref().map(|v| format!("; one completion was found, not proven the only one: id {}", v.id())).unwrap_or_default()
        ),
    }
}

/// Reads and checks `bytes`, yielding to the page between slices; gives up quietly when
/// `still_wanted` turns false (a newer input arrived).
async fn check(
    bytes: Arc<Vec<u8>>,
    format: Option<Format>,
    phase: RwSignal<Phase>,
    still_wanted: impl Fn() -> bool,
) {
    phase.set(Phase::Reading);
    next_tick().await;
    let opts = ReadOptions {
        format,
        ..ReadOptions::default()
    };
    let read_start = now_ms();
    let parsed = formats::read(&bytes, &opts);
    let read_ms = now_ms() - read_start;
    let parsed = match parsed {
        Ok(p) => p,
        Err(e) => {
            phase.set(Phase::Malformed(e.to_string()));
            return;
        }
    };
    if !still_wanted() {
        return;
    }
    let m = parsed.matrix;
    let start = now_ms();
    let mut workers = 0;
    let mut workers_ms = 0.0;
    let mut on_workers = None;
    if pool::worth_it(&m) {
        if let Some(p) = pool::take().await {
            workers = p.size();
            let progress = |f| phase.set(Phase::Checking(f));
            match p.check(&m, PAIR_CAP, progress, &still_wanted).await {
                None => return,
                Some(Ok((report, busy, p))) => {
                    pool::give_back(p);
                    workers_ms = busy;
                    on_workers = Some(report);
                }
                Some(Err(e)) => {
                    web_sys::console::warn_1(&format!("checking on the page itself: {e}").into());
                    workers = 0;
                }
            }
        }
    }
    let report = match on_workers {
        Some(r) => r,
        None => match check_here(&m, phase, &still_wanted).await {
            Some(r) => r,
            None => return,
        },
    };
    let millis = now_ms() - start;
    // The id and properties were a pass of their own; let the page breathe before drawing.
    next_tick().await;
    let erasures = parsed.erasures.len();
    let unknown = (erasures > 0).then(|| {
        let mut u = Matrix::ones(m.rows(), m.cols());
        for &(i, j) in &parsed.erasures {
            u.set_negative(i, j, true);
        }
        Arc::new(u)
    });
    if erasures > 0 {
        // The completion can take a while: show the bar full first.
        phase.set(Phase::Checking(1.0));
        next_tick().await;
    }
    let d = diagnose(&m, &parsed.erasures, &report, CompletionLimits::default());
    let completion = d.completion.as_ref().map(completion_words);
    let fix = match (d.repair, d.completion) {
        (Some(r), _) => Some(Fix::Signs {
            entries: r.entries,
            id: r.corrected_id,
            corrected: Arc::new(r.corrected.into_matrix()),
            unique: r.unique_within_distance,
        }),
        (
            None,
            Some(CompletionReport {
                outcome: Completion::Unique { id, matrix, .. },
                ..
            }),
        ) => Some(Fix::Completed {
            id,
            corrected: Arc::new(matrix.into_matrix()),
        }),
        _ => None,
    };
    let marked = match &fix {
        Some(Fix::Signs { entries, .. }) => {
            let mut rows: Vec<usize> = entries.iter().map(|e| e.0).collect();
            rows.dedup();
            rows
        }
        _ if erasures > 0 => Vec::new(),
        _ => marked_rows(&report),
    };
    if !still_wanted() {
        return;
    }
    phase.set(Phase::Done(Outcome {
        report: Arc::new(report),
        verdict: d.verdict,
        format: parsed.format,
        erasures,
        unknown,
        completion,
        fix,
        matrix: Arc::new(m),
        marked,
        read_ms,
        millis,
        workers,
        workers_ms,
    }));
}

/// The check on the page's own thread, in slices of about [`SLICE_MS`]; `None` when abandoned.
async fn check_here(
    m: &Matrix,
    phase: RwSignal<Phase>,
    still_wanted: impl Fn() -> bool,
) -> Option<Report> {
    let mut progressive = Progressive::new(m, PAIR_CAP);
    let mut budget: u64 = 1 << 14;
    loop {
        let t0 = now_ms();
        let done = progressive.step(budget);
        if progressive.is_done() {
            break;
        }
        let dt = now_ms() - t0;
        if dt < SLICE_MS / 2.0 {
            budget = budget.saturating_mul(2);
        } else if dt > SLICE_MS * 2.0 {
            budget = (budget / 2).max(1);
        }
        phase.set(Phase::Checking(done));
        next_tick().await;
        if !still_wanted() {
            return None;
        }
    }
    Some(progressive.finish())
}

async fn read_file(file: web_sys::File) -> Result<Vec<u8>, String> {
    let buf = JsFuture::from(file.array_buffer())
        .await
        .map_err(|_| format!("{} could not be read", file.name()))?;
    Ok(js_sys::Uint8Array::new(&buf).to_vec())
}

fn size_words(bytes: usize) -> String {
    match bytes {
        b if b < 10_000 => format!("{b} bytes"),
        b if b < 10_000_000 => format!("{} kB", b / 1000),
        b => format!("{:.1} MB", b as f64 / 1e6),
    }
}

/// The ids the server found possibly equivalent (same invariant), and its note about them.
fn equivalence_of(body: &UploadAnswer) -> (Vec<String>, Option<String>) {
    let e = &body.equivalence;
    (
        e.possibly_equivalent_to.clone().unwrap_or_default(),
        Some(e.note.clone()),
    )
}

/// The verify screen: input, progress, verdict, picture, repairs, publishing.
#[component]
pub fn VerifyPanel(
    /// Whether this panel is the page (an `h1`) or a section of the home page (an `h2`).
    heading: bool,
) -> impl IntoView {
    let text = RwSignal::new(String::new());
    let format = RwSignal::new(String::from("auto"));
    let phase = RwSignal::new(Phase::Idle);
    let source = RwSignal::new(None::<Source>);
    let publish = RwSignal::new(Publish::Idle);
    let confirming = RwSignal::new(false);
    let dragging = RwSignal::new(false);
    let generation = StoredValue::new(0u32);
    pool::warm_up();

    let run = move |src: Source| {
        generation.update_value(|g| *g += 1);
        let mine = generation.get_value();
        let f = format.get_untracked().parse::<Format>().ok();
        source.set(Some(src.clone()));
        publish.set(Publish::Idle);
        confirming.set(false);
        spawn_local(check(src.bytes, f, phase, move || {
            generation.get_value() == mine
        }));
    };
    let run_text = move || {
        let t = text.get_untracked();
        run(Source {
            bytes: Arc::new(t.into_bytes()),
            name: "the pasted text".into(),
        });
    };
    let run_file = move |file: web_sys::File| {
        spawn_local(async move {
            let name = file.name();
            match read_file(file).await {
                Ok(bytes) => run(Source {
                    bytes: Arc::new(bytes),
                    name,
                }),
                Err(e) => phase.set(Phase::Malformed(e)),
            }
        });
    };
    let on_pick = move |ev: web_sys::Event| {
        let input: web_sys::HtmlInputElement = event_target(&ev);
        if let Some(file) = input.files().and_then(|fs| fs.get(0)) {
            run_file(file);
        }
        input.set_value("");
    };
    let on_drop = move |ev: web_sys::DragEvent| {
        ev.prevent_default();
        dragging.set(false);
        if let Some(file) = ev
            .data_transfer()
            .and_then(|d| d.files())
            .and_then(|fs| fs.get(0))
        {
            run_file(file);
        }
    };
    let use_corrected = move |m: Arc<Matrix>| {
        let pm = m.canonical_text();
        text.set(pm.clone());
        format.set("auto".into());
        run(Source {
            bytes: Arc::new(pm.into_bytes()),
            name: "the corrected matrix".into(),
        });
    };
    let do_publish = move || {
        let Some(src) = source.get_untracked() else {
            return;
        };
        publish.set(Publish::Sending);
        spawn_local(async move {
            let answer = api::post_bytes::<UploadAnswer>("/api/matrices", &src.bytes).await;
            publish.set(match answer {
                Ok((status, r)) => {
                    let id = r.id.clone();
                    let url = r.url.clone();
                    let (similar, note) = equivalence_of(&r);
                    Publish::Stored {
                        existed: status == 200,
                        similar: similar.into_iter().filter(|s| *s != id).collect(),
                        note,
                        id,
                        url,
                    }
                }
                Err(e) if e.status == 413 => {
                    Publish::Refused("The file is larger than the server accepts.".into())
                }
                Err(e) if e.status == 0 => {
                    Publish::Refused(format!("Not published: {}.", e.message))
                }
                Err(e) => Publish::Refused(format!("The server refused it: {}", e.message)),
            });
        });
    };

    let verdict_attr = move || match phase.get() {
        Phase::Done(o) => Some(match o.verdict {
            diagnose::Verdict::Hadamard => "hadamard",
            diagnose::Verdict::Incomplete => "incomplete",
            diagnose::Verdict::NotHadamard => "not-hadamard",
        }),
        Phase::Malformed(_) => Some("error"),
        _ => None,
    };
    let timing = move |which: u8| match phase.get() {
        Phase::Done(o) => Some(format!(
            "{:.1}",
            if which == 0 { o.read_ms } else { o.millis }
        )),
        _ => None,
    };
    let kernel = move || match phase.get() {
        Phase::Done(o) => Some(o.report.kernel.clone()),
        _ => None,
    };
    let workers = move || match phase.get() {
        Phase::Done(o) => Some(o.workers.to_string()),
        _ => None,
    };
    let workers_ms = move || match phase.get() {
        Phase::Done(o) if o.workers > 0 => Some(format!("{:.1}", o.workers_ms)),
        _ => None,
    };
    let verdict_class = move || match verdict_attr() {
        Some(v) => format!("verdict {v}"),
        None => "verdict".to_string(),
    };

    let title = "Verify a matrix in your browser";
    view! {
        <section class="card verify" aria-labelledby="verify-title"
            class:dragging=move || dragging.get()
            on:dragover=move |ev: web_sys::DragEvent| { ev.prevent_default(); dragging.set(true); }
            on:dragleave=move |_| dragging.set(false)
            on:drop=on_drop
        >
            {if heading {
                view! { <h1 id="verify-title" tabindex="-1">{title}</h1> }.into_any()
            } else {
                view! { <h2 id="verify-title">{title}</h2> }.into_any()
            }}
            <p class="lede">
                "Drop a file here, choose one, or paste the rows. It is read and checked on this computer, by the same code as the "
                <code>"hadamard verify"</code>" command; nothing is sent anywhere unless you publish it."
            </p>
            <div class="inputs">
                <div class="field">
                    <label for="matrix-text">"Matrix text"</label>
                    <textarea id="matrix-text" rows="8" spellcheck="false" autocomplete="off"
                        aria-describedby="formats-help"
                        placeholder="+ + + +\n+ − + −\n…  or  1,-1,1,…  or  [[1,-1],…]"
                        prop:value=move || text.get()
                        on:input=move |ev| text.set(event_target_value(&ev))
                        on:keydown=move |ev: web_sys::KeyboardEvent| {
                            if ev.key() == "Enter" && (ev.ctrl_key() || ev.meta_key()) {
                                ev.prevent_default();
                                run_text();
                            }
                        }
                    ></textarea>
                    <p id="formats-help" class="help">
                        "Any of: rows of + and − (pm); ±1 integers with spaces or commas (CSV); rows of 0 and 1 (bits, 1 = −1); "
                        "a JSON array of rows; a NumPy .npy file. Lines starting with # are comments, ? marks an erased entry. Ctrl+Enter verifies."
                    </p>
                </div>
                <div class="actions">
                    <button type="button" class="primary" id="verify-text" on:click=move |_| run_text()>"Verify the text"</button>
                    <label class="button" for="matrix-file">"Choose a file…"</label>
                    <input type="file" id="matrix-file" class="visually-hidden" on:change=on_pick />
                    <label class="inline" for="format">"Format"</label>
                    <select id="format" on:change=move |ev| format.set(event_target_value(&ev)) prop:value=move || format.get()>
                        <option value="auto">"detect"</option>
                        <option value="pm">"pm (+/−)"</option>
                        <option value="int">"int / CSV"</option>
                        <option value="bits">"bits (0/1)"</option>
                        <option value="json">"JSON"</option>
                        <option value="npy">".npy"</option>
                    </select>
                    <button type="button" class="quiet" on:click=move |_| { text.set(EXAMPLE.into()); run_text(); }>"Try an example"</button>
                </div>
            </div>

            <div id="verdict" class=verdict_class role="status" aria-live="polite" data-verdict=verdict_attr
                data-read-ms=move || timing(0) data-check-ms=move || timing(1)
                data-kernel=kernel data-workers=workers data-workers-ms=workers_ms>
                {move || match phase.get() {
                    Phase::Idle => view! { <p class="waiting">"No matrix checked yet."</p> }.into_any(),
                    Phase::Reading => view! { <p class="waiting">"Reading…"</p> }.into_any(),
                    Phase::Checking(f) => view! {
                        <p class="waiting">"Checking every pair of rows… " {format!("{:.0}%", f * 100.0)}</p>
                        <progress max="1" prop:value=f aria-label="Share of row pairs checked"></progress>
                    }.into_any(),
                    Phase::Malformed(msg) => view! {
                        <p class="headline">"This input could not be read."</p>
                        <p class="message" id="error-message"><code>{msg}</code></p>
                        <p class="help">"Places are counted from 1, in characters, as the command line counts them."</p>
                    }.into_any(),
                    Phase::Done(o) => {
                        let name = source.get_untracked().map(|s| format!("{} ({})", s.name, size_words(s.bytes.len()))).unwrap_or_default();
                        view! { <Verdict o=o name=name use_corrected=use_corrected /> }.into_any()
                    }
                }}
            </div>

            {move || match phase.get() {
                Phase::Done(o) if o.verdict == diagnose::Verdict::Hadamard => Some(view! {
                    <section class="publish" aria-labelledby="publish-title">
                        <h3 id="publish-title">"Publish to the catalogue"</h3>
                        <p class="notice">
                            <strong>"Published matrices are public and permanent."</strong>
                            " Anyone can find, view and download it, and it cannot be changed or withdrawn later. "
                            "Publishing sends this file to the server, which checks it again before storing it under its permanent link."
                        </p>
                        <button type="button" class="primary" id="publish"
                            disabled=move || confirming.get() || matches!(publish.get(), Publish::Sending | Publish::Stored { .. })
                            on:click=move |_| confirming.set(true)>"Publish to the catalogue…"</button>
                        {move || confirming.get().then(|| view! {
                            <div class="confirm" role="alertdialog" aria-labelledby="confirm-title" id="publish-confirm-box">
                                <p id="confirm-title"><strong>"Publish this matrix permanently?"</strong>
                                    " It becomes public under its permanent link, and it can never be changed or withdrawn."</p>
                                <button type="button" class="primary" id="publish-confirm"
                                    on:click=move |_| { confirming.set(false); do_publish(); }>"Yes, publish it permanently"</button>
                                " "
                                <button type="button" id="publish-cancel" on:click=move |_| confirming.set(false)>"Cancel"</button>
                            </div>
                        })}
                        <div class="publish-result" aria-live="polite">
                            {move || match publish.get() {
                                Publish::Idle => ().into_any(),
                                Publish::Sending => view! { <p>"Sending…"</p> }.into_any(),
                                Publish::Refused(msg) => view! { <p class="bad" id="publish-error">{msg}</p> }.into_any(),
                                Publish::Stored { id, url, existed, similar, note } => {
                                    let href = format!("/m/{id}");
                                    let full = absolute(&url);
                                    // The server's note only says "possibly equivalent"; where
                                    // there are candidates the equivalence search below decides,
                                    // so the note is shown only when there is nothing to check.
                                    let note = note.filter(|_| similar.is_empty());
                                    view! {
                                        <p id="publish-ok" data-id=id.clone()>
                                            {if existed { "Already in the catalogue. Its permanent link: " } else { "Published. Its permanent link: " }}
                                            <a href=href.clone() id="permalink">{full}</a>
                                        </p>
                                        {(!similar.is_empty()).then(|| {
                                            let count = similar.len();
                                            view! {
                                                <div id="equivalence-checks">
                                                    <p>{format!("{count} stored matri{} of this order share{} its invariant, which does not decide equivalence; the equivalence search decides it:", if count == 1 { "x" } else { "ces" }, if count == 1 { "s" } else { "" })}</p>
                                                    {similar.into_iter().take(5).map(|s| view! { <EquivalenceResult a=id.clone() b=s /> }).collect_view()}
                                                </div>
                                            }
                                        })}
                                        {note.map(|n| view! { <p class="help" id="equivalence-note">{format!("Equivalence: {n}.")}</p> })}
                                        <p><a href=href class="button">"Open its page"</a></p>
                                    }.into_any()
                                }
                            }}
                        </div>
                    </section>
                }),
                _ => None,
            }}
        </section>
    }
}

/// `url` made absolute against this page's origin, for showing and copying.
pub fn absolute(url: &str) -> String {
    if url.starts_with("http://") || url.starts_with("https://") {
        return url.to_string();
    }
    let origin = crate::app::window().location().origin().unwrap_or_default();
    format!("{origin}{url}")
}

#[component]
fn Verdict(
    o: Outcome,
    name: String,
    use_corrected: impl Fn(Arc<Matrix>) + Copy + 'static,
) -> impl IntoView {
    let r = o.report.clone();
    let n = r.order;
    let shape = if r.order == r.cols {
        format!("order {n}")
    } else {
        format!("{}×{}", r.order, r.cols)
    };
    let headline = match o.verdict {
        diagnose::Verdict::Incomplete => {
            format!("Incomplete: {} entries erased (?), {shape}.", o.erasures)
        }
        diagnose::Verdict::Hadamard => {
            format!("Hadamard: {shape}, every pair of rows is orthogonal (H·Hᵀ = {n}·I).")
        }
        diagnose::Verdict::NotHadamard => format!("Not Hadamard: {shape}."),
    };
    let pairs_all = (n as u64) * (n as u64).saturating_sub(1) / 2;
    // With erased entries the pairs were counted with ? as +1, which says nothing: not listed.
    let reasons = r
        .failures
        .iter()
        .filter(|_| o.erasures == 0)
        .map(|f| match f {
            Failure::NotSquare => view! { <li>{format!("It is not square: {} rows, {} columns.", r.order, r.cols)}</li> }.into_any(),
            Failure::ImpossibleOrder => view! {
                <li>{format!("{n} is not 1, 2 or a multiple of 4, so no Hadamard matrix of this order exists.")}</li>
            }
            .into_any(),
            Failure::RowsNotOrthogonal => {
                let shown: Vec<_> = r.failing_pairs.iter().take(PAIRS_SHOWN).cloned().collect();
                let more = r.failing_pairs_total.saturating_sub(shown.len() as u64);
                view! {
                    <li>
                        {format!("{} of {} row pairs are not orthogonal (rows counted from 1):", r.failing_pairs_total, pairs_all)}
                        <ul class="pairs" id="failing-pairs">
                            {shown.into_iter().map(|p| view! {
                                <li>{format!("rows {} and {}: inner product {}", p.i + 1, p.j + 1, p.dot)}</li>
                            }).collect_view()}
                        </ul>
                        {(more > 0).then(|| view! { <p class="help">{format!("… and {more} more.")}</p> })}
                    </li>
                }
                .into_any()
            }
        })
        .collect_view();
    let erased = (o.erasures > 0).then(|| {
        view! { <li>{format!("It has {} erased entries (?), so it is not a matrix of ±1 values yet.", o.erasures)}</li> }
    });
    let fix = o.fix.clone().map(|f| match f {
        Fix::Signs { entries, id, corrected, unique } if entries.len() == 1 => {
            let (row, col) = entries[0];
            let was = if o.matrix.is_negative(row, col) { "−1" } else { "+1" };
            let now = if was == "−1" { "+1" } else { "−1" };
            view! {
                <div class="repair" id="repair">
                    <p>
                        <strong>{format!("One wrong sign explains it: row {}, column {}", row + 1, col + 1)}</strong>
                        {format!(" (counted from 1). Changing that entry from {was} to {now} gives a Hadamard matrix, id ")}
                        <code class="id">{id}</code>"."
                        {unique.then_some(" No other Hadamard matrix differs from the input in one entry only.")}
                    </p>
                    <button type="button" on:click=move |_| use_corrected(corrected.clone())>"Use the corrected matrix"</button>
                </div>
            }
            .into_any()
        }
        Fix::Signs { entries, id, corrected, unique } => {
            let d = entries.len();
            let shown: Vec<String> = entries
                .iter()
                .take(PAIRS_SHOWN)
                .map(|&(i, j)| format!("row {}, column {}", i + 1, j + 1))
                .collect();
            let more = d.saturating_sub(shown.len());
            view! {
                <div class="repair" id="repair">
                    <p>
                        <strong>{format!("{d} wrong signs explain it")}</strong>
                        " (counted from 1): "{shown.join("; ")}
                        {(more > 0).then(|| format!(" … and {more} more"))}
                        ". Changing them gives a Hadamard matrix, id "<code class="id">{id}</code>". "
                        {if unique {
                            format!("No other Hadamard matrix is within {d} changes of the input (two distinct ones differ in at least {n} entries).")
                        } else {
                            format!("Whether another Hadamard matrix is within {d} changes is not decided.")
                        }}
                    </p>
                    <button type="button" on:click=move |_| use_corrected(corrected.clone())>"Use the corrected matrix"</button>
                </div>
            }
            .into_any()
        }
        Fix::Completed { id, corrected } => view! {
            <div class="repair" id="repair">
                <p>"Filled in, it is a Hadamard matrix with id "<code class="id">{id}</code>"."</p>
                <button type="button" on:click=move |_| use_corrected(corrected.clone())>"Use the completed matrix"</button>
            </div>
        }
        .into_any(),
    });
    let p = &r.properties;
    let props: Vec<&str> = [
        (p.normalized, "normalized"),
        (p.symmetric, "symmetric"),
        (p.skew, "skew"),
        (p.regular, "regular"),
    ]
    .into_iter()
    .filter_map(|(on, name)| on.then_some(name))
    .collect();
    let props = if props.is_empty() {
        "none of normalized, symmetric, skew, regular".to_string()
    } else {
        props.join(", ")
    };
    let label = format!("Picture of the matrix, {shape}: light squares are +1, dark squares −1.");
    let cells = match &o.fix {
        Some(Fix::Signs { entries, .. }) => entries.clone(),
        _ => Vec::new(),
    };
    let label = if o.erasures > 0 {
        format!("{label} Erased entries (?) are amber.")
    } else {
        label
    };
    let small_enough = o.matrix.rows() > 0 && o.matrix.cols() > 0;
    let placeholder = (o.erasures > 0).then_some(" (with every ? read as +1)");
    view! {
        <p class="headline">{headline}</p>
        {(o.verdict != diagnose::Verdict::Hadamard).then(|| view! { <ul class="reasons">{reasons}{erased}</ul> })}
        {o.completion.clone().map(|c| view! { <p>{c}</p> })}
        {fix}
        <dl class="facts">
            <dt>"Input"</dt><dd>{name}</dd>
            <dt>"Read as"</dt><dd>{o.format.name()}</dd>
            <dt>"Id"</dt><dd><code class="id" id="local-id">{r.sha256.clone()}</code>{placeholder}</dd>
            <dt>"Properties"</dt><dd>{format!("{props} (excess {})", p.excess)}{placeholder}</dd>
            <dt>"Check"</dt><dd>{format!("{}, in this browser: read in {:.0} ms, checked in {:.0} ms{}", r.check, o.read_ms, o.millis, match o.workers {
                0 => String::new(),
                1 => " by a Web Worker".to_string(),
                k => format!(" by {k} Web Workers"),
            })}</dd>
        </dl>
        {small_enough.then(|| view! { <MatrixPicture matrix=o.matrix.clone() marked=o.marked.clone() cells=cells unknown=o.unknown.clone() label=label /> })}
    }
}
