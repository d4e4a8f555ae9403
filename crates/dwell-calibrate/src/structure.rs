//! The grey-box model structures and their parameters.
//!
//! Three nested-in-spirit structures, each a linear RC network with the indoor air node `Ti`
//! read by the thermostat, driven by the outdoor temperature `To` (°C, linear between
//! samples), the heating power `P` (W), the solar irradiance `I` (W/m², times an effective
//! aperture `A_s` (m²)) and an unmeasured constant gain `Q₀` (W), all entering the air node:
//!
//! ```text
//! order 1 (1R1C):  Ti ─H─ To                                  HLC = H
//! order 2 (2R2C):  Ti ─H_ie─ Te ─H_eo─ To                      HLC = H_ie·H_eo/(H_ie+H_eo)
//! order 3 (3R3C):  Tm ─H_im─ Ti ─H_ie─ Te ─H_eo─ To             HLC = H_ie·H_eo/(H_ie+H_eo)
//! ```
//!
//! `Te` is the envelope mass (C_e), `Tm` the interior mass (C_m). These are the "Ti", "TiTe"
//! and "TiTeTm"-style structures of Bacher & Madsen, *Identifying suitable models for the heat
//! dynamics of buildings*, Energy and Buildings 43(7), 2011 (cited from memory), here
//! without their sensor node.
//!
//! Conductances and capacitances are fitted as logarithms (so they stay positive and the
//! fit is scale-free); `A_s`, `Q₀` and the initial temperatures of the mass nodes are fitted
//! as they are. The initial air temperature is the first measured indoor temperature.

use dwell_solver::{InputKind, RcSystem};
use nalgebra::DMatrix;

/// Model order: number of thermal capacities.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
pub enum Order {
    /// One node: air and everything in it (1R1C).
    One,
    /// Air and envelope mass (2R2C).
    Two,
    /// Air, interior mass and envelope mass (3R3C).
    Three,
}

impl Order {
    /// From 1, 2 or 3.
    pub fn from_number(n: u32) -> Option<Order> {
        match n {
            1 => Some(Order::One),
            2 => Some(Order::Two),
            3 => Some(Order::Three),
            _ => None,
        }
    }

    /// 1, 2 or 3.
    pub fn number(self) -> u32 {
        match self {
            Order::One => 1,
            Order::Two => 2,
            Order::Three => 3,
        }
    }

    /// Node names, air first.
    pub fn nodes(self) -> &'static [&'static str] {
        match self {
            Order::One => &["air"],
            Order::Two => &["air", "envelope"],
            Order::Three => &["air", "envelope", "interior"],
        }
    }
}

/// Physical parameters of a structure (SI).
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct RcParams {
    /// The structure.
    pub order: Order,
    /// Air to envelope conductance (W/K); for order 1 the only conductance, air to outdoors.
    pub h_ie_w_k: f64,
    /// Envelope to outdoor conductance (W/K); unused for order 1.
    pub h_eo_w_k: f64,
    /// Air to interior mass conductance (W/K); order 3 only.
    pub h_im_w_k: f64,
    /// Air node capacitance (J/K).
    pub c_i_j_k: f64,
    /// Envelope capacitance (J/K); orders 2 and 3.
    pub c_e_j_k: f64,
    /// Interior mass capacitance (J/K); order 3 only.
    pub c_m_j_k: f64,
    /// Effective solar aperture (m²): heat into the air node per unit irradiance.
    pub aperture_m2: f64,
    /// Unmeasured constant heat gain into the air node (W).
    pub gain_w: f64,
    /// Initial temperatures of the nodes after air (°C): envelope, interior.
    pub initial_c: Vec<f64>,
}

impl RcParams {
    /// Heat-loss coefficient (W/K): the steady conductance from air to outdoors.
    pub fn hlc_w_k(&self) -> f64 {
        match self.order {
            Order::One => self.h_ie_w_k,
            _ => self.h_ie_w_k * self.h_eo_w_k / (self.h_ie_w_k + self.h_eo_w_k),
        }
    }

    /// The RC system: inputs `[To (°C, first-order hold), heat into air (W, zero-order hold)]`.
    pub fn system(&self) -> Result<RcSystem, dwell_solver::SolverError> {
        let n = self.order.nodes().len();
        let mut k = DMatrix::zeros(n, n);
        let mut u = DMatrix::zeros(n, 2);
        let mut caps = vec![self.c_i_j_k];
        let link = |k: &mut DMatrix<f64>, a: usize, b: usize, g: f64| {
            k[(a, a)] += g;
            k[(b, b)] += g;
            k[(a, b)] -= g;
            k[(b, a)] -= g;
        };
        match self.order {
            Order::One => {
                k[(0, 0)] += self.h_ie_w_k;
                u[(0, 0)] = self.h_ie_w_k;
            }
            Order::Two | Order::Three => {
                caps.push(self.c_e_j_k);
                link(&mut k, 0, 1, self.h_ie_w_k);
                k[(1, 1)] += self.h_eo_w_k;
                u[(1, 0)] = self.h_eo_w_k;
                if self.order == Order::Three {
                    caps.push(self.c_m_j_k);
                    link(&mut k, 0, 2, self.h_im_w_k);
                }
            }
        }
        u[(0, 1)] = 1.0;
        RcSystem::new(
            caps,
            k,
            u,
            vec![InputKind::Temperature, InputKind::HeatFlow],
        )
    }
}

/// Which parameters a fit estimates and how they map to a vector θ.
#[derive(Clone, Debug)]
pub struct Layout {
    /// The structure.
    pub order: Order,
    /// Whether the data carry irradiance (else `A_s` is fixed at 0).
    pub solar: bool,
    /// Parameter names, in θ order (`ln_` prefix for logarithms).
    pub names: Vec<&'static str>,
}

impl Layout {
    /// The layout of `order`, with `A_s` if `solar`.
    pub fn new(order: Order, solar: bool) -> Layout {
        let mut names = match order {
            Order::One => vec!["ln_h_w_k", "ln_c_i_j_k"],
            Order::Two => vec!["ln_h_ie_w_k", "ln_h_eo_w_k", "ln_c_i_j_k", "ln_c_e_j_k"],
            Order::Three => vec![
                "ln_h_ie_w_k",
                "ln_h_eo_w_k",
                "ln_h_im_w_k",
                "ln_c_i_j_k",
                "ln_c_e_j_k",
                "ln_c_m_j_k",
            ],
        };
        if solar {
            names.push("aperture_m2");
        }
        names.push("gain_w");
        match order {
            Order::One => {}
            Order::Two => names.push("t_e0_c"),
            Order::Three => {
                names.push("t_e0_c");
                names.push("t_m0_c");
            }
        }
        Layout {
            order,
            solar,
            names,
        }
    }

    /// Number of parameters.
    pub fn len(&self) -> usize {
        self.names.len()
    }

    /// True if empty (never).
    pub fn is_empty(&self) -> bool {
        self.names.is_empty()
    }

    /// Physical parameters from θ.
    pub fn params(&self, th: &[f64]) -> RcParams {
        let mut i = 0;
        let mut next = || {
            let v = th[i];
            i += 1;
            v
        };
        let (h_ie, h_eo, h_im, c_i, c_e, c_m) = match self.order {
            Order::One => (next().exp(), 0.0, 0.0, next().exp(), 0.0, 0.0),
            Order::Two => {
                let (a, b) = (next().exp(), next().exp());
                let (c, d) = (next().exp(), next().exp());
                (a, b, 0.0, c, d, 0.0)
            }
            Order::Three => {
                let (a, b, c) = (next().exp(), next().exp(), next().exp());
                let (d, e, f) = (next().exp(), next().exp(), next().exp());
                (a, b, c, d, e, f)
            }
        };
        let aperture = if self.solar { next() } else { 0.0 };
        let gain = next();
        let initial = (1..self.order.nodes().len()).map(|_| next()).collect();
        RcParams {
            order: self.order,
            h_ie_w_k: h_ie,
            h_eo_w_k: h_eo,
            h_im_w_k: h_im,
            c_i_j_k: c_i,
            c_e_j_k: c_e,
            c_m_j_k: c_m,
            aperture_m2: aperture,
            gain_w: gain,
            initial_c: initial,
        }
    }

    /// θ from physical parameters (the inverse of [`Layout::params`]).
    pub fn theta(&self, p: &RcParams) -> Vec<f64> {
        let mut th = match self.order {
            Order::One => vec![p.h_ie_w_k.ln(), p.c_i_j_k.ln()],
            Order::Two => vec![
                p.h_ie_w_k.ln(),
                p.h_eo_w_k.ln(),
                p.c_i_j_k.ln(),
                p.c_e_j_k.ln(),
            ],
            Order::Three => vec![
                p.h_ie_w_k.ln(),
                p.h_eo_w_k.ln(),
                p.h_im_w_k.ln(),
                p.c_i_j_k.ln(),
                p.c_e_j_k.ln(),
                p.c_m_j_k.ln(),
            ],
        };
        if self.solar {
            th.push(p.aperture_m2);
        }
        th.push(p.gain_w);
        th.extend(p.initial_c.iter().copied());
        th
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn theta_round_trip_every_order() {
        for order in [Order::One, Order::Two, Order::Three] {
            let lay = Layout::new(order, true);
            let p = RcParams {
                order,
                h_ie_w_k: 150.0,
                h_eo_w_k: if order == Order::One { 0.0 } else { 900.0 },
                h_im_w_k: if order == Order::Three { 400.0 } else { 0.0 },
                c_i_j_k: 3e6,
                c_e_j_k: if order == Order::One { 0.0 } else { 2e7 },
                c_m_j_k: if order == Order::Three { 1e7 } else { 0.0 },
                aperture_m2: 2.5,
                gain_w: 300.0,
                initial_c: vec![15.0; order.nodes().len() - 1],
            };
            let q = lay.params(&lay.theta(&p));
            assert!((q.h_ie_w_k - p.h_ie_w_k).abs() < 1e-9 && (q.c_i_j_k - p.c_i_j_k).abs() < 1e-3);
            assert_eq!(q.initial_c, p.initial_c);
            assert_eq!(lay.theta(&q).len(), lay.len());
            let sys = p.system().unwrap();
            assert_eq!(sys.states(), order.nodes().len());
        }
    }

    #[test]
    fn hlc_of_series_envelope() {
        // Two conductances in series: 1/(1/150 + 1/900) = 128.571… W/K (analytic).
        let lay = Layout::new(Order::Two, false);
        let p = lay.params(&[
            150f64.ln(),
            900f64.ln(),
            1e6f64.ln(),
            1e7f64.ln(),
            0.0,
            10.0,
        ]);
        assert!((p.hlc_w_k() - 128.571_428_571).abs() < 1e-6);
    }
}
