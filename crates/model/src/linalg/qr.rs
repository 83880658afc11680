//! Streaming Householder QR for least squares.
//!
//! Rows are folded into a p×p upper-triangular factor `R` and the rotated response `Qᵀy` a chunk
//! at a time, so an n×p design matrix is never held in memory (a 1,000,000-row market with 20
//! terms would otherwise need 160 MB). Two accumulators built on separate threads merge by
//! folding one's `R` into the other, which is the same Householder update again. This is the
//! sequential QR of Gentleman (1974) and Miller (1992, AS 274), done with Householder
//! reflections instead of Givens rotations. Solving through `R` rather than the normal
//! equations keeps Longley-class problems accurate (see the NIST checks in the test suite).

/// Rows held before they are folded into `R`; large enough to amortise the fold, small enough to
/// stay in cache.
const CHUNK_ROWS: usize = 512;

/// Accumulates `R` and `Qᵀy` for a least-squares problem with a fixed number of columns.
#[derive(Debug, Clone)]
pub struct QrAccumulator {
    columns: usize,
    /// Row-major p×p upper triangle.
    r: Vec<f64>,
    qty: Vec<f64>,
    /// Sum of squares of the rotated response below row p: the residual sum of squares.
    rss_tail: f64,
    rows: usize,
    /// Pending rows, column-major: column j of the chunk is `chunk[j * CHUNK_ROWS..]`.
    chunk: Vec<f64>,
    chunk_y: Vec<f64>,
    chunk_len: usize,
}

impl QrAccumulator {
    /// An empty accumulator for `columns` regressors.
    #[must_use]
    pub fn new(columns: usize) -> Self {
        Self {
            columns,
            r: vec![0.0; columns * columns],
            qty: vec![0.0; columns],
            rss_tail: 0.0,
            rows: 0,
            chunk: vec![0.0; columns * CHUNK_ROWS],
            chunk_y: vec![0.0; CHUNK_ROWS],
            chunk_len: 0,
        }
    }

    /// Number of regressors.
    #[must_use]
    pub fn columns(&self) -> usize {
        self.columns
    }

    /// Number of rows added so far.
    #[must_use]
    pub fn rows(&self) -> usize {
        self.rows + self.chunk_len
    }

    /// Adds one observation: its regressor values (length `columns`) and response.
    pub fn push_row(&mut self, x: &[f64], y: f64) {
        debug_assert_eq!(x.len(), self.columns);
        let i = self.chunk_len;
        for (j, &value) in x.iter().enumerate() {
            self.chunk[j * CHUNK_ROWS + i] = value;
        }
        self.chunk_y[i] = y;
        self.chunk_len += 1;
        if self.chunk_len == CHUNK_ROWS {
            self.fold_chunk();
        }
    }

    /// Folds another accumulator's rows into this one (for work split across threads).
    pub fn merge(&mut self, mut other: QrAccumulator) {
        debug_assert_eq!(self.columns, other.columns);
        other.fold_chunk();
        self.fold_chunk();
        let p = self.columns;
        // The other's R rows with its Qᵀy are an exact summary of its observations.
        let r_rows = std::mem::take(&mut other.r);
        let mut r_y = std::mem::take(&mut other.qty);
        let mut cols: Vec<f64> = vec![0.0; p * p];
        for i in 0..p {
            for j in 0..p {
                cols[j * p + i] = r_rows[i * p + j];
            }
        }
        fold_rows(&mut self.r, &mut self.qty, &mut cols, &mut r_y, p, p, p);
        self.rss_tail += r_y.iter().map(|v| v * v).sum::<f64>() + other.rss_tail;
        self.rows += other.rows;
    }

    /// Folds any pending rows and returns the triangular factor.
    #[must_use]
    pub fn finish(mut self) -> QrFactor {
        self.fold_chunk();
        QrFactor {
            columns: self.columns,
            r: self.r,
            qty: self.qty,
            rss: self.rss_tail,
            rows: self.rows,
        }
    }

    fn fold_chunk(&mut self) {
        if self.chunk_len == 0 {
            return;
        }
        let m = self.chunk_len;
        fold_rows(
            &mut self.r,
            &mut self.qty,
            &mut self.chunk,
            &mut self.chunk_y,
            self.columns,
            m,
            CHUNK_ROWS,
        );
        self.rss_tail += self.chunk_y[..m].iter().map(|v| v * v).sum::<f64>();
        self.rows += m;
        self.chunk_len = 0;
    }
}

/// Householder-reduces `[R; X]` to `[R'; 0]`, applying the same reflections to `[qty; y]`.
/// `x` is column-major with column stride `stride` and `m` live rows. On return `y[..m]` holds
/// the rotated residual part.
fn fold_rows(
    r: &mut [f64],
    qty: &mut [f64],
    x: &mut [f64],
    y: &mut [f64],
    p: usize,
    m: usize,
    stride: usize,
) {
    for k in 0..p {
        let (head, tail) = x.split_at_mut((k + 1) * stride);
        let xk = &head[k * stride..k * stride + m];
        let sigma = dot(xk, xk);
        if sigma == 0.0 {
            continue;
        }
        let alpha = r[k * p + k];
        let norm = (alpha * alpha + sigma).sqrt();
        let new_diag = if alpha >= 0.0 { -norm } else { norm };
        let v0 = alpha - new_diag;
        let tau = 2.0 / (v0 * v0 + sigma);
        for j in (k + 1)..p {
            let xj = &mut tail[(j - k - 1) * stride..(j - k - 1) * stride + m];
            let dot = v0 * r[k * p + j] + dot(xk, xj);
            let f = tau * dot;
            r[k * p + j] -= f * v0;
            for (a, &b) in xj.iter_mut().zip(xk) {
                *a -= f * b;
            }
        }
        let dot_y = v0 * qty[k] + dot(xk, &y[..m]);
        let f = tau * dot_y;
        qty[k] -= f * v0;
        for (a, &b) in y[..m].iter_mut().zip(xk) {
            *a -= f * b;
        }
        r[k * p + k] = new_diag;
    }
}

/// Inner product in four interleaved partial sums, which the compiler turns into vector
/// instructions (a single running sum must be added in order and cannot be); the partial sums
/// also round a little less than one long running sum.
fn dot(a: &[f64], b: &[f64]) -> f64 {
    let n = a.len().min(b.len());
    let (a, b) = (&a[..n], &b[..n]);
    let mut lanes = [0.0f64; 4];
    let (a4, a_rest) = a.split_at(n - n % 4);
    let (b4, b_rest) = b.split_at(n - n % 4);
    for (x, y) in a4.chunks_exact(4).zip(b4.chunks_exact(4)) {
        for k in 0..4 {
            lanes[k] += x[k] * y[k];
        }
    }
    let tail: f64 = a_rest.iter().zip(b_rest).map(|(x, y)| x * y).sum();
    (lanes[0] + lanes[2]) + (lanes[1] + lanes[3]) + tail
}

/// The finished factorisation: `R`, `Qᵀy` and the residual sum of squares.
#[derive(Debug, Clone)]
pub struct QrFactor {
    columns: usize,
    r: Vec<f64>,
    qty: Vec<f64>,
    rss: f64,
    rows: usize,
}

/// Why a factor cannot be solved.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum RankError {
    /// Column `column` is (numerically) a combination of earlier columns.
    #[error("column {column} is a linear combination of the columns before it")]
    Deficient {
        /// Zero-based index of the first dependent column.
        column: usize,
    },
}

impl QrFactor {
    /// Number of regressors.
    #[must_use]
    pub fn columns(&self) -> usize {
        self.columns
    }

    /// Number of observations folded in.
    #[must_use]
    pub fn rows(&self) -> usize {
        self.rows
    }

    /// Residual sum of squares accumulated during the rotation.
    #[must_use]
    pub fn rss(&self) -> f64 {
        self.rss
    }

    /// Checks that every column carries information beyond the ones before it.
    pub fn check_rank(&self) -> Result<(), RankError> {
        let p = self.columns;
        let max_diag = (0..p).map(|k| self.r[k * p + k].abs()).fold(0.0, f64::max);
        let tolerance = max_diag * 1e-11 * (p.max(1) as f64);
        for k in 0..p {
            // Compare against the column's own scale too, so a column of small numbers is not
            // mistaken for a dependent one.
            let col_scale = (0..=k).map(|i| self.r[i * p + k].abs()).fold(0.0, f64::max);
            let diag = self.r[k * p + k].abs();
            if diag == 0.0 || diag <= tolerance.min(col_scale * 1e-11) {
                return Err(RankError::Deficient { column: k });
            }
        }
        Ok(())
    }

    /// Solves `R b = Qᵀy` by back substitution.
    pub fn solve(&self) -> Result<Vec<f64>, RankError> {
        self.check_rank()?;
        Ok(self.back_substitute(&self.qty))
    }

    fn back_substitute(&self, rhs: &[f64]) -> Vec<f64> {
        let p = self.columns;
        let mut b = rhs.to_vec();
        for k in (0..p).rev() {
            let row = &self.r[k * p..(k + 1) * p];
            let s = b[k] - dot(&row[k + 1..], &b[k + 1..]);
            b[k] = s / row[k];
        }
        b
    }

    /// `x' (X'X)^-1 x`, computed as `||R^-T x||²` without forming the inverse.
    #[must_use]
    pub fn leverage_of(&self, x: &[f64]) -> f64 {
        const STACK: usize = 64;
        let p = self.columns;
        let mut stack = [0.0; STACK];
        let mut heap = Vec::new();
        let z: &mut [f64] = if p <= STACK {
            &mut stack[..p]
        } else {
            heap.resize(p, 0.0);
            &mut heap
        };
        // Forward substitution with R' (column i of R holds row i of R').
        for i in 0..p {
            let mut s = x[i];
            for (k, zk) in z[..i].iter().enumerate() {
                s -= self.r[k * p + i] * zk;
            }
            z[i] = s / self.r[i * p + i];
        }
        z.iter().map(|v| v * v).sum()
    }

    /// Diagonal of `(X'X)^-1 = R^-1 R^-T`, the unscaled coefficient variances.
    #[must_use]
    pub fn unscaled_variances(&self) -> Vec<f64> {
        let p = self.columns;
        let inv = self.r_inverse();
        // (R^-1 R^-T)_kk is the squared length of row k of R^-1.
        (0..p)
            .map(|k| inv[k * p..(k + 1) * p].iter().map(|v| v * v).sum())
            .collect()
    }

    /// `R^-1`, row-major, one back substitution per unit vector.
    fn r_inverse(&self) -> Vec<f64> {
        let p = self.columns;
        let mut inv = vec![0.0; p * p];
        let mut e = vec![0.0; p];
        for j in 0..p {
            e.fill(0.0);
            e[j] = 1.0;
            for (i, v) in self.back_substitute(&e).into_iter().enumerate() {
                inv[i * p + j] = v;
            }
        }
        inv
    }
}
