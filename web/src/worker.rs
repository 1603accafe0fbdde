//! The check worker: a second, small wasm module (core's exact check and nothing else) that the
//! verify page runs in Web Workers, one per core, to check a large matrix in parallel.
//!
//! `src/check-worker.js` loads it and passes messages to the three functions below. Each worker
//! keeps its own copy of the matrix, because wasm memories are not shared between workers; the
//! page sends it once, then asks for shares of the check and for the facts (id, properties),
//! and merges the answers with `hadamard_core::verify::Merge`, which accepts each share once
//! and gives a report only when all n(n−1)/2 pairs are in. Natively this binary is empty.

#[cfg(target_arch = "wasm32")]
mod check {
    use hadamard_core::verify;
    use hadamard_core::Matrix;
    use std::cell::RefCell;
    use wasm_bindgen::prelude::*;

    thread_local! {
        static MATRIX: RefCell<Option<Matrix>> = const { RefCell::new(None) };
    }

    fn with_matrix<R>(f: impl FnOnce(&Matrix) -> R) -> Result<R, JsError> {
        MATRIX
            .with(|m| m.borrow().as_ref().map(f))
            .ok_or_else(|| JsError::new("no matrix loaded"))
    }

    /// Keeps the `rows` × `cols` matrix whose packed words (`words_for(cols)` per row) are `words`.
    #[wasm_bindgen]
    pub fn load(rows: usize, cols: usize, words: Vec<u64>) -> Result<(), JsError> {
        let m = Matrix::from_words(rows, cols, words)
            .ok_or_else(|| JsError::new("the words do not fit the shape"))?;
        MATRIX.with(|slot| *slot.borrow_mut() = Some(m));
        Ok(())
    }

    /// Checks share `share` of the loaded matrix's split; its [`verify::Share`] as JSON.
    #[wasm_bindgen]
    pub fn check_share(share: usize, cap: usize) -> Result<String, JsError> {
        let result = with_matrix(|m| {
            (share < verify::Split::of(m).shares()).then(|| verify::check_share(m, share, cap))
        })?
        .ok_or_else(|| JsError::new("no such share"))?;
        serde_json::to_string(&result).map_err(|e| JsError::new(&e.to_string()))
    }

    /// The id and properties of the loaded matrix ([`verify::Facts`]) as JSON.
    #[wasm_bindgen]
    pub fn facts() -> Result<String, JsError> {
        let f = with_matrix(verify::facts)?;
        serde_json::to_string(&f).map_err(|e| JsError::new(&e.to_string()))
    }
}

fn main() {}
