//! The registry's vocabulary in plain words: statuses, construction names, conventions.

/// A short label for a status as the API spells it.
pub fn status_label(status: &str) -> &'static str {
    match status {
        "constructible" => "buildable here",
        "known" => "known",
        "open" => "open",
        "impossible" => "impossible",
        "uncovered" => "not covered",
        _ => "unknown status",
    }
}

/// One sentence saying what a status means for order n.
pub fn status_sentence(status: &str, n: u64) -> String {
    match status {
        "constructible" => format!("This program builds a Hadamard matrix of order {n} now, and checks it exactly."),
        "known" => format!("The literature has a Hadamard matrix of order {n}; this program cannot build it yet."),
        "open" => format!("No Hadamard matrix of order {n} is known to anyone: the order is open."),
        "impossible" => format!("No Hadamard matrix of order {n} can exist: an order must be 1, 2 or a multiple of 4."),
        "uncovered" => format!(
            "Order {n} is possible, but it lies beyond the literature table (which ends at 2000) and no construction this program knows reaches it."
        ),
        _ => format!("The server gave order {n} a status this page does not know: {status}."),
    }
}

/// Why orders other than 1, 2 and multiples of 4 are impossible.
pub const IMPOSSIBLE_WHY: &str = "Negating columns makes the first row all +1 without changing orthogonality. \
Any other row is then orthogonal to the first, so it has n/2 entries −1. Two such rows, orthogonal to \
each other as well, must then agree with the first row in exactly n/4 of its places, so n is a multiple of 4 \
whenever n > 2.";

/// The nearest possible orders below and above n (for n that is not one).
pub fn nearest_orders(n: u64) -> (Option<u64>, u64) {
    let below = match n {
        0 | 1 => None,
        3 => Some(2),
        _ => Some(n / 4 * 4),
    };
    let above = if n < 2 { 2 } else { (n / 4 + 1) * 4 };
    (below.filter(|&b| b > 0), above)
}

/// A construction's name, as its papers call it, from the API's snake_case method name.
pub fn method_name(method: &str) -> String {
    let known = match method {
        "sylvester" => "Sylvester's doubling",
        "paley_one" => "Paley's first construction",
        "paley_two" => "Paley's second construction",
        "kronecker" => "Kronecker product",
        "conference_product" => "Conference-matrix product",
        "twin_prime_power" => "Twin prime power difference set",
        "williamson" => "Williamson's array",
        "goethals_seidel" => "Goethals–Seidel array",
        "t_sequences" => "T-sequences in the Goethals–Seidel array",
        "cooper_wallis" => "Cooper–Wallis (T-sequences with Williamson matrices)",
        "skew_doubling" => "Skew doubling",
        "miyamoto" => "Miyamoto's theorem",
        "yamada" => "Yamada's theorems",
        "literature" => "Known from the literature",
        "seed" => "Sequence data from our seed catalogue",
        "published" => "Sequence data proved to exist in print",
        "golay_product" => "Golay pair product",
        "golay_doubling" => "Golay pair doubling",
        "golay_to_t" => "T-sequences from a Golay pair",
        "base_to_t" => "T-sequences from base sequences",
        "turyn_to_base" => "Base sequences from Turyn-type sequences",
        "turyn_williamson" => "Turyn's Williamson matrices",
        _ => "",
    };
    if known.is_empty() {
        method.replace('_', " ")
    } else {
        known.to_string()
    }
}

/// True when a route-tree node of this method yields a matrix (its `order` is a matrix order),
/// rather than sequence data indexed by a length.
pub fn yields_matrix(method: &str) -> bool {
    matches!(
        method,
        "sylvester"
            | "paley_one"
            | "paley_two"
            | "kronecker"
            | "conference_product"
            | "twin_prime_power"
            | "williamson"
            | "goethals_seidel"
            | "t_sequences"
            | "cooper_wallis"
            | "skew_doubling"
            | "miyamoto"
            | "yamada"
            | "literature"
    )
}
