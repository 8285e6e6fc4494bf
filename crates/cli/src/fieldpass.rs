//! Full-field passes: the measures of every point or cell of one increment, into reused
//! buffers, in parallel.
//!
//! One fused kernel reads the decoded stress array and writes σ_h, σ_vm, η, θ̄ and a
//! "defined" mask per entity; no allocation per entity, no intermediate array of states.

use ductrace_tensor::{ComponentOrder, batch};
use ductrace_track::fields::{EqpsSource, Fields};
use ductrace_vtk::{Increment, Series, find_nonfinite};
use rayon::prelude::*;

use crate::failure::Failure;

/// Per-entity measures of one increment. `triaxiality` and `lode_angle_param` hold 0
/// where `defined` is false (never read there).
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
    /// θ̄ where defined.
    pub lode_angle_param: Vec<f64>,
    /// Shape measures defined (σ_vm > 0 and finite input).
    pub defined: Vec<bool>,
}

const CHUNK: usize = batch::CHUNK;

impl FieldState {
    /// Decodes and evaluates one increment. Non-finite stress or ε̄p values are an error
    /// unless `allow_nonfinite`, in which case those entities are undefined (and their ε̄p
    /// is carried from the previous increment by the caller's kernel, which sees them as
    /// undefined).
    pub fn load(
        &mut self,
        series: &Series,
        inc: &Increment<'_>,
        fields: &Fields,
        allow_nonfinite: bool,
    ) -> Result<(), Failure> {
        let loc = fields.location;
        inc.read(&fields.stress, loc, &mut self.stress)?;
        let width = fields.stress_components;
        if let Some(nf) = find_nonfinite(&self.stress, width)
            && !allow_nonfinite
        {
            return Err(Failure::data(format!(
                "{}: stress {:?} at increment {} has {} non-finite values (first at {loc} {}); --allow-nonfinite skips them",
                series.path().display(),
                fields.stress,
                inc.index(),
                nf.count,
                nf.first_tuple
            )));
        }
        match &fields.eqps {
            Some(EqpsSource::Scalar(name)) => {
                inc.read(name, loc, &mut self.eqps)?;
                if let Some(nf) = find_nonfinite(&self.eqps, 1)
                    && !allow_nonfinite
                {
                    return Err(Failure::data(format!(
                        "{}: equivalent plastic strain {name:?} at increment {} has {} non-finite values (first at {loc} {}); --allow-nonfinite skips them",
                        series.path().display(),
                        inc.index(),
                        nf.count,
                        nf.first_tuple
                    )));
                }
            }
            Some(EqpsSource::Accumulated { name, .. }) => {
                return Err(Failure::data(format!(
                    "{}: full-field work needs a scalar equivalent plastic strain array; this result has only the plastic strain tensor {name:?} (name a scalar with --eqps)",
                    series.path().display()
                )));
            }
            None => {
                return Err(Failure::data(format!(
                    "{}: no equivalent plastic strain array (name one with --eqps)",
                    series.path().display()
                )));
            }
        }
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
        self.lode_angle_param.resize(n, 0.0);
        self.defined.resize(n, false);
        let order: ComponentOrder = fields.stress_order;
        let stress = &self.stress;
        self.sigma_h
            .par_chunks_mut(CHUNK)
            .zip(self.sigma_vm.par_chunks_mut(CHUNK))
            .zip(self.triaxiality.par_chunks_mut(CHUNK))
            .zip(self.lode_angle_param.par_chunks_mut(CHUNK))
            .zip(self.defined.par_chunks_mut(CHUNK))
            .zip(stress.par_chunks(CHUNK * width))
            .for_each(|(((((h, vm), eta), theta), def), s)| {
                for (i, t) in s.chunks_exact(width).enumerate() {
                    match batch::state_of(t, &order) {
                        Ok(st) => {
                            h[i] = st.sigma_h;
                            vm[i] = st.sigma_vm;
                            match st.lode() {
                                Some(l) => {
                                    eta[i] = l.triaxiality;
                                    theta[i] = l.lode_angle_param;
                                    def[i] = true;
                                }
                                None => {
                                    eta[i] = 0.0;
                                    theta[i] = 0.0;
                                    def[i] = false;
                                }
                            }
                        }
                        Err(_) => {
                            h[i] = f64::NAN;
                            vm[i] = f64::NAN;
                            eta[i] = 0.0;
                            theta[i] = 0.0;
                            def[i] = false;
                        }
                    }
                }
            });
        Ok(())
    }
}
