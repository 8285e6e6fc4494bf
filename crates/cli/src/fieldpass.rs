//! Full-field passes: the measures of every point or cell of one increment, into reused
//! buffers, in parallel.
//!
//! One fused kernel ([`ductrace_tensor::batch::measures_of`]) reads the decoded stress
//! array and writes σ_h, σ_vm, η, θ̄ and a "defined" mask per entity, counting non-finite
//! input on the way; no allocation per entity, no intermediate array of states. Decoding
//! ([`FieldState::fetch`]) and evaluation ([`FieldState::evaluate`]) are separate steps so
//! a pass can decode the next increment while it evaluates this one.

use ductrace_tensor::{ComponentOrder, batch};
use ductrace_track::fields::{EqpsSource, Fields};
use ductrace_vtk::{Increment, Series, find_nonfinite};
use rayon::iter::Either;
use rayon::prelude::*;

use crate::failure::Failure;

/// Whether a pass computes the Lode angle parameter θ̄ (one `acos` per entity).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Lode {
    /// Compute θ̄ (export, loci that depend on it).
    Compute,
    /// Leave it out: the pass's locus does not depend on θ̄
    /// ([`ductrace_locus::FractureLocus::uses_lode_angle`]).
    Skip,
}

/// Per-entity measures of one increment. `triaxiality` and `lode_angle_param` hold 0
/// where `defined` is false (never read there); `lode_angle_param` is empty when the pass
/// did not ask for θ̄ (a locus that does not depend on it).
#[derive(Debug, Default)]
pub struct FieldState {
    /// Decoded stress (reused).
    pub stress: Vec<f64>,
    /// Decoded ε̄p (reused).
    pub eqps: Vec<f64>,
    /// σ_h.
    pub sigma_h: Vec<f64>,
    /// σ_vm.
    pub sigma_vm: Vec<f64>,
    /// η where defined.
    pub triaxiality: Vec<f64>,
    /// θ̄ where defined; empty when not asked for.
    pub lode_angle_param: Vec<f64>,
    /// Shape measures defined (σ_vm > 0 and finite input).
    pub defined: Vec<bool>,
}

const CHUNK: usize = batch::CHUNK;

impl FieldState {
    /// Decodes and evaluates one increment: [`FieldState::fetch`] then
    /// [`FieldState::evaluate`]. Non-finite stress or ε̄p values are an error unless
    /// `allow_nonfinite`, in which case those entities are undefined (and their ε̄p is
    /// carried from the previous increment by the caller's kernel, which sees them as
    /// undefined).
    pub fn load(
        &mut self,
        series: &Series,
        inc: &Increment<'_>,
        fields: &Fields,
        allow_nonfinite: bool,
        lode: Lode,
    ) -> Result<(), Failure> {
        self.fetch(series, inc, fields)?;
        self.evaluate(series, inc.index(), fields, allow_nonfinite, lode)
    }

    /// Decodes the stress and ε̄p arrays of one increment into the reused buffers, nothing
    /// else; a pass can fetch increment k + 1 into a second state while it evaluates
    /// increment k.
    pub fn fetch(
        &mut self,
        series: &Series,
        inc: &Increment<'_>,
        fields: &Fields,
    ) -> Result<(), Failure> {
        let loc = fields.location;
        inc.read(&fields.stress, loc, &mut self.stress)?;
        match &fields.eqps {
            Some(EqpsSource::Scalar(name)) => {
                inc.read(name, loc, &mut self.eqps)?;
                Ok(())
            }
            Some(EqpsSource::Accumulated { name, .. }) => Err(Failure::data(format!(
                "{}: full-field work needs a scalar equivalent plastic strain array; this result has only the plastic strain tensor {name:?} (name a scalar with --eqps)",
                series.path().display()
            ))),
            None => Err(Failure::data(format!(
                "{}: no equivalent plastic strain array (name one with --eqps)",
                series.path().display()
            ))),
        }
    }

    /// Evaluates the fetched arrays of increment `index` in one parallel pass: σ_h, σ_vm,
    /// η, θ̄ (with [`Lode::Compute`]) and the mask per entity ([`batch::measures_of`]),
    /// counting non-finite input on the way; the first non-finite value is located (for the
    /// message) only when there is one and `allow_nonfinite` is off.
    pub fn evaluate(
        &mut self,
        series: &Series,
        index: usize,
        fields: &Fields,
        allow_nonfinite: bool,
        lode: Lode,
    ) -> Result<(), Failure> {
        let loc = fields.location;
        let width = fields.stress_components;
        let n = self.stress.len() / width;
        if self.eqps.len() != n {
            return Err(Failure::data(format!(
                "{}: stress has {n} tuples but the equivalent plastic strain {}",
                series.path().display(),
                self.eqps.len()
            )));
        }
        self.sigma_h.resize(n, 0.0);
        self.sigma_vm.resize(n, 0.0);
        self.triaxiality.resize(n, 0.0);
        self.defined.resize(n, false);
        let chunks = n.div_ceil(CHUNK);
        let theta_chunks = match lode {
            Lode::Compute => {
                self.lode_angle_param.resize(n, 0.0);
                Either::Left(self.lode_angle_param.par_chunks_mut(CHUNK).map(Some))
            }
            Lode::Skip => {
                self.lode_angle_param.clear();
                Either::Right((0..chunks).into_par_iter().map(|_| None))
            }
        };
        let order: ComponentOrder = fields.stress_order;
        let stress = &self.stress;
        let (bad_stress, bad_eqps) = self
            .sigma_h
            .par_chunks_mut(CHUNK)
            .zip(self.sigma_vm.par_chunks_mut(CHUNK))
            .zip(self.triaxiality.par_chunks_mut(CHUNK))
            .zip(theta_chunks)
            .zip(self.defined.par_chunks_mut(CHUNK))
            .zip(stress.par_chunks(CHUNK * width))
            .zip(self.eqps.par_chunks(CHUNK))
            .map(|((((((h, vm), eta), mut theta), def), s), e)| {
                let mut bad = 0usize;
                for (i, t) in s.chunks_exact(width).enumerate() {
                    let (theta_i, ok) = match batch::measures_of(t, &order) {
                        Ok(m) => {
                            h[i] = m.sigma_h;
                            vm[i] = m.sigma_vm;
                            match m.shape {
                                Some(l) => {
                                    eta[i] = l.triaxiality;
                                    // θ̄ (one acos) only when asked for
                                    let th = if theta.is_some() {
                                        l.lode_angle_param()
                                    } else {
                                        0.0
                                    };
                                    (th, true)
                                }
                                None => {
                                    eta[i] = 0.0;
                                    (0.0, false)
                                }
                            }
                        }
                        Err(_) => {
                            bad += 1;
                            h[i] = f64::NAN;
                            vm[i] = f64::NAN;
                            eta[i] = 0.0;
                            (0.0, false)
                        }
                    };
                    def[i] = ok;
                    if let Some(th) = theta.as_deref_mut() {
                        th[i] = theta_i;
                    }
                }
                (bad, e.iter().filter(|v| !v.is_finite()).count())
            })
            .reduce(|| (0, 0), |a, b| (a.0 + b.0, a.1 + b.1));
        if bad_stress > 0
            && !allow_nonfinite
            && let Some(nf) = find_nonfinite(&self.stress, width)
        {
            return Err(Failure::data(format!(
                "{}: stress {:?} at increment {index} has {} non-finite values (first at {loc} {}); --allow-nonfinite skips them",
                series.path().display(),
                fields.stress,
                nf.count,
                nf.first_tuple
            )));
        }
        if bad_eqps > 0
            && !allow_nonfinite
            && let Some(nf) = find_nonfinite(&self.eqps, 1)
        {
            let name = match &fields.eqps {
                Some(EqpsSource::Scalar(name)) => name.as_str(),
                _ => "",
            };
            return Err(Failure::data(format!(
                "{}: equivalent plastic strain {name:?} at increment {index} has {} non-finite values (first at {loc} {}); --allow-nonfinite skips them",
                series.path().display(),
                nf.count,
                nf.first_tuple
            )));
        }
        Ok(())
    }
}
