//! The factorisation in two halves side by side: the unknowns on either side of the first
//! nested-dissection separator, each with the separator, factored by faer on their own, and the
//! separator's Schur complement assembled from the two trailing blocks and factored densely.
use super::whole::{identity_symbolic, numeric_llt, Layout};
use crate::error::{Error, Result};
use faer::dyn_stack::MemBuffer;
use faer::sparse::linalg::cholesky::SymbolicCholesky;
use faer::sparse::{SparseColMatRef, SymbolicSparseColMat};
use faer::Par;

/// One half of a bisected system: the unknowns of one side of the first separator followed by
/// the separator's, factored on their own (a principal submatrix of an SPD matrix is SPD).
pub(super) struct Half {
    pub(super) pattern: SymbolicSparseColMat<usize>,
    pub(super) chol: SymbolicCholesky<usize>,
    /// (slot in the whole matrix's pattern, slot in this half's pattern).
    pub(super) map: Vec<(usize, usize)>,
    pub(super) vals: Vec<f64>,
    pub(super) l_val: Vec<f64>,
    pub(super) fbuf: MemBuffer,
    pub(super) lay: Layout,
    /// The factor's trailing separator block L_SS,h (dense, column-major lower) ...
    pub(super) lss: Vec<f64>,
    /// ... and L_SS,h L_SS,hᵀ = A_SS − L_S,h L_S,hᵀ (lower part).
    pub(super) schur: Vec<f64>,
    pub(super) y: Vec<f64>,
    pub(super) tmp: Vec<f64>,
    pub(super) u: Vec<f64>,
}

impl Half {
    pub(super) fn factor(&mut self, vals: &[f64], s: usize) -> Result<()> {
        for &(g, l) in &self.map {
            self.vals[l] = vals[g];
        }
        numeric_llt(
            &self.chol,
            &mut self.l_val,
            SparseColMatRef::new(self.pattern.as_ref(), &self.vals),
            &mut self.fbuf,
        )?;
        self.lay.trailing_block(&self.l_val, s, &mut self.lss);
        // schur = L Lᵀ (lower part) by rank-one updates over the columns k of L, contiguous in i.
        let (l, sc) = (&self.lss, &mut self.schur);
        sc.iter_mut().for_each(|v| *v = 0.0);
        for k in 0..s {
            let lk = &l[k * s..(k + 1) * s];
            for j in k..s {
                let ljk = lk[j];
                if ljk != 0.0 {
                    for (v, &lik) in sc[j * s + j..(j + 1) * s].iter_mut().zip(&lk[j..]) {
                        *v += lik * ljk;
                    }
                }
            }
        }
        Ok(())
    }

    /// Forward solve of this half with the right-hand side `b` on its own unknowns and 0 on the
    /// separator; leaves y = L_DD⁻¹ b_D and u = L_S,h y (the separator's update).
    pub(super) fn forward(&mut self, b: &[f64], s: usize) {
        let n = self.lay.fwd.len();
        for i in 0..n - s {
            self.y[i] = b[self.lay.fwd[i]];
        }
        self.y[n - s..].iter_mut().for_each(|v| *v = 0.0);
        self.lay.forward(&self.l_val, &mut self.y, &mut self.tmp);
        // The separator part is now L_SS,h⁻¹ (−L_S,h y_D): u = −L_SS,h (that).
        let (l, z) = (&self.lss, &self.y[n - s..]);
        for i in 0..s {
            let mut acc = 0.0;
            for k in 0..=i {
                acc += l[k * s + i] * z[k];
            }
            self.u[i] = -acc;
        }
    }

    /// Backward solve given the separator's solution `xs`: the separator part of y is set to
    /// L_SS,hᵀ xs, so the half's own backward solve returns x_D = L_DD⁻ᵀ (y_D − L_S,hᵀ xs).
    pub(super) fn backward(&mut self, xs: &[f64], s: usize) {
        let n = self.lay.fwd.len();
        let l = &self.lss;
        for k in 0..s {
            let mut acc = 0.0;
            for i in k..s {
                acc += l[k * s + i] * xs[i];
            }
            self.y[n - s + k] = acc;
        }
        self.lay.backward(&self.l_val, &mut self.y, &mut self.tmp);
    }
}

/// A Cholesky factorisation split at the first nested-dissection separator S into the two
/// halves D₁ ∪ S and D₂ ∪ S, factored side by side (rayon::join), and the separator's Schur
/// complement
///
/// ```text
/// Σ = A_SS − L_S1 L_S1ᵀ − L_S2 L_S2ᵀ = L_SS,1 L_SS,1ᵀ + L_SS,2 L_SS,2ᵀ − A_SS
/// ```
///
/// factored densely (L_SS,h: the trailing block of half h's factor). The columns of D₁ and D₂
/// are exactly those of the whole factor (the halves do not couple except through S), so the
/// arithmetic is that of one factorisation plus three dense s × s products.
pub(super) struct Split {
    pub(super) halves: [Half; 2],
    /// Separator size.
    pub(super) s: usize,
    /// The separator's unknowns, in order.
    pub(super) sep: Vec<usize>,
    /// (slot, i, j) of A_SS's lower-triangle entries, i ≥ j separator indices.
    pub(super) ass: Vec<(usize, usize, usize)>,
    /// Cholesky factor of Σ (dense, column-major lower).
    pub(super) lsig: Vec<f64>,
    pub(super) xs: Vec<f64>,
}

impl Split {
    /// The split of the pattern (`pattern`: lower CSC in original numbering) for the order
    /// `fwd` bisected at positions a, b (see [`nested_dissection_split`]); `None` if a half is
    /// empty or faer's analysis is not supernodal.
    pub(super) fn new(
        pattern: &SymbolicSparseColMat<usize>,
        fwd: &[usize],
        a: usize,
        b: usize,
    ) -> Result<Option<Self>> {
        let n = fwd.len();
        let s = n - b;
        if a == 0 || b == a || s == 0 || s > 400 {
            return Ok(None);
        }
        let mut pos = vec![0usize; n];
        for (k, &p) in fwd.iter().enumerate() {
            pos[p] = k;
        }
        // Local index of a position in half 0 (D₁ then S) and half 1 (D₂ then S).
        let local = |h: usize, k: usize| -> Option<usize> {
            match (h, k) {
                (_, k) if k >= b => Some(if h == 0 { a } else { b - a } + (k - b)),
                (0, k) if k < a => Some(k),
                (1, k) if (a..b).contains(&k) => Some(k - a),
                _ => None,
            }
        };
        let (cp, ri) = (pattern.col_ptr(), pattern.row_idx());
        let mut entries: [Vec<(usize, usize, usize)>; 2] = [Vec::new(), Vec::new()];
        let mut ass = Vec::new();
        for c in 0..n {
            for slot in cp[c]..cp[c + 1] {
                let (pc, pr) = (pos[c], pos[ri[slot]]);
                let mut placed = false;
                for (h, e) in entries.iter_mut().enumerate() {
                    if let (Some(lc), Some(lr)) = (local(h, pc), local(h, pr)) {
                        e.push((lc.min(lr), lc.max(lr), slot));
                        placed = true;
                    }
                }
                if !placed {
                    return Ok(None); // not a separator after all
                }
                if pc >= b && pr >= b {
                    let (i, j) = (pc.max(pr) - b, pc.min(pr) - b);
                    ass.push((slot, i, j));
                }
            }
        }
        let mut halves = Vec::new();
        for (h, mut e) in entries.into_iter().enumerate() {
            e.sort_unstable();
            let nl = if h == 0 { a + s } else { b - a + s };
            let pairs: Vec<(usize, usize)> = e.iter().map(|&(c, r, _)| (c, r)).collect();
            let (lower, chol) = identity_symbolic(nl, &pairs)?;
            let map = e.iter().enumerate().map(|(l, &(_, _, g))| (g, l)).collect();
            let lfwd: Vec<usize> = if h == 0 {
                fwd[..a].iter().chain(&fwd[b..]).copied().collect()
            } else {
                fwd[a..].to_vec()
            };
            let Some(lay) = Layout::of(&chol, Some(&lfwd)) else {
                return Ok(None);
            };
            let fbuf = MemBuffer::new(
                chol.factorize_numeric_llt_scratch::<f64>(Par::Seq, Default::default()),
            );
            halves.push(Half {
                vals: vec![0.0; e.len()],
                l_val: vec![0.0; chol.len_val()],
                pattern: lower,
                chol,
                map,
                fbuf,
                lay,
                lss: vec![0.0; s * s],
                schur: vec![0.0; s * s],
                y: vec![0.0; nl],
                tmp: vec![0.0; nl],
                u: vec![0.0; s],
            });
        }
        let h1 = halves.pop().expect("two halves");
        let h0 = halves.pop().expect("two halves");
        Ok(Some(Split {
            halves: [h0, h1],
            s,
            sep: fwd[b..].to_vec(),
            ass,
            lsig: vec![0.0; s * s],
            xs: vec![0.0; s],
        }))
    }

    /// Factor the matrix with values `vals` (whole pattern's slot order).
    pub(super) fn factor(&mut self, vals: &[f64]) -> Result<()> {
        let s = self.s;
        let [h0, h1] = &mut self.halves;
        let (r0, r1) = rayon::join(|| h0.factor(vals, s), || h1.factor(vals, s));
        r0?;
        r1?;
        let sig = &mut self.lsig;
        for j in 0..s {
            for i in j..s {
                sig[j * s + i] = h0.schur[j * s + i] + h1.schur[j * s + i];
            }
        }
        for &(slot, i, j) in &self.ass {
            sig[j * s + i] -= vals[slot];
        }
        // Dense Cholesky in place (column-major lower), right-looking.
        for j in 0..s {
            let d = sig[j * s + j];
            if d <= 0.0 || !d.is_finite() {
                return Err(Error::NotPositiveDefinite(format!(
                    "separator pivot {j} = {d:e}"
                )));
            }
            let d = d.sqrt();
            sig[j * s + j] = d;
            for i in j + 1..s {
                sig[j * s + i] /= d;
            }
            for k in j + 1..s {
                let lkj = sig[j * s + k];
                if lkj != 0.0 {
                    for i in k..s {
                        sig[k * s + i] -= sig[j * s + i] * lkj;
                    }
                }
            }
        }
        Ok(())
    }

    /// Solve A x = b in place with the factors (original numbering).
    pub(super) fn solve(&mut self, b: &mut [f64]) {
        let s = self.s;
        let [h0, h1] = &mut self.halves;
        {
            let bb: &[f64] = b;
            rayon::join(|| h0.forward(bb, s), || h1.forward(bb, s));
        }
        let (l, x) = (&self.lsig, &mut self.xs);
        for i in 0..s {
            x[i] = b[self.sep[i]] - h0.u[i] - h1.u[i];
        }
        for j in 0..s {
            x[j] /= l[j * s + j];
            let xj = x[j];
            for i in j + 1..s {
                x[i] -= l[j * s + i] * xj;
            }
        }
        for j in (0..s).rev() {
            let mut acc = x[j];
            for i in j + 1..s {
                acc -= l[j * s + i] * x[i];
            }
            x[j] = acc / l[j * s + j];
        }
        let xs: &[f64] = x;
        rayon::join(|| h0.backward(xs, s), || h1.backward(xs, s));
        for h in [&*h0, &*h1] {
            let nd = h.lay.fwd.len() - s;
            for i in 0..nd {
                b[h.lay.fwd[i]] = h.y[i];
            }
        }
        for (k, &p) in self.sep.iter().enumerate() {
            b[p] = self.xs[k];
        }
    }
}
