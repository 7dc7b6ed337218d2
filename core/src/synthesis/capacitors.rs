//! The coupling and bypass capacitors sized for the lower corner.

use super::*;

impl Ctx<'_> {
    /// Sizes the coupling and bypass capacitors (see the module docs) and
    /// returns them with the corner they were sized for.
    pub(super) fn size_caps(
        &self,
        p: &Point,
        stage: &Stage,
        m: &Measured,
        notes: &mut Vec<String>,
    ) -> Result<(Caps, f64)> {
        let s = self.spec;
        let f_t = s
            .requirements
            .max_f_low
            .map_or(DEFAULT_F_LOW, |f| f * CORNER_MARGIN);
        if s.requirements.max_f_low.is_none() {
            notes.push(format!(
                "no max_f_low: the capacitors are sized for a lower corner of {}",
                format_si(f_t, "Hz")
            ));
        }
        let ss = &m.ss;
        let (rx, rpi, b1) = (ss.rbb, ss.r_pi, ss.beta0 + 1.0);
        let rb = stage.bias_resistance();
        let (rs, rl) = (s.rs, s.rl);
        let pin = &s.parts;
        // (which, Rᵢ seen with the other capacitors shorted, pinned value)
        let mut list: Vec<(u8, f64, Option<f64>)> = Vec::with_capacity(3);
        // formula: short-circuit resistances (Sedra & Smith, ch. 9)
        match self.kind() {
            StageKind::CommonEmitter => {
                list.push((0, rs + parallel(rb, rx + rpi + b1 * p.re), pin.c_in));
                list.push((1, p.rc + rl, pin.c_out));
                if p.re_bypassed > 0.0 {
                    let r = parallel(p.re_bypassed, p.re + (rx + rpi + parallel(rs, rb)) / b1);
                    list.push((2, r, pin.c_emitter));
                }
            }
            StageKind::CommonCollector => {
                list.push((
                    0,
                    rs + parallel(rb, rx + rpi + b1 * parallel(p.re, rl)),
                    pin.c_in,
                ));
                list.push((
                    1,
                    rl + parallel(p.re, (rx + rpi + parallel(rs, rb)) / b1),
                    pin.c_out,
                ));
            }
            StageKind::CommonBase => {
                list.push((0, rs + parallel(p.re, (rx + rpi) / b1), pin.c_in));
                list.push((1, p.rc + rl, pin.c_out));
                list.push((
                    3,
                    parallel(rb, rx + rpi + b1 * parallel(p.re, rs)),
                    pin.c_base,
                ));
            }
        }
        let w = 2.0 * core::f64::consts::PI * f_t;
        let taken: f64 = list
            .iter()
            .filter_map(|(_, r, c)| c.map(|c| 1.0 / (r * c)))
            .sum();
        let mut budget = w - taken;
        if budget < 0.1 * w {
            notes.push("the pinned capacitors alone take most of the lower-corner budget".into());
            budget = 0.1 * w;
        }
        // formula: Cᵢ = Σⱼ Rⱼ^(−1/2) / (ω·Rᵢ^(1/2)), shares ∝ 1/√Rᵢ
        let norm: f64 = list
            .iter()
            .filter(|(_, _, c)| c.is_none())
            .map(|(_, r, _)| 1.0 / libm::sqrt(*r))
            .sum();
        let mut caps = Caps::default();
        for &(which, r, pinned) in &list {
            let c = pinned.unwrap_or_else(|| norm / (budget * libm::sqrt(r)));
            match which {
                0 => caps.c_in = Some(c),
                1 => caps.c_out = Some(c),
                2 => caps.c_emitter = Some(c),
                _ => caps.c_base = Some(c),
            }
        }
        if norm == 0.0 {
            return Ok((caps, f_t));
        }
        // Scale the free capacitors together until the exact corner is f_t.
        let free = |c: &mut Caps, k: f64| {
            for &(which, _, pinned) in &list {
                if pinned.is_some() {
                    continue;
                }
                let slot = match which {
                    0 => &mut c.c_in,
                    1 => &mut c.c_out,
                    2 => &mut c.c_emitter,
                    _ => &mut c.c_base,
                };
                *slot = slot.map(|v| (v * k).min(MAX_CAPACITANCE));
            }
        };
        for _ in 0..8 {
            let st = self.stage_of(p, &caps);
            let resp = Response::new(&st, ss)?;
            let level = corner_level(&resp);
            // A first-order high-pass at its −3 dB point: slope ½, curvature −½.
            let start = Start {
                x: libm::log(f_t),
                slope: 0.5,
                curvature: -0.5,
            };
            let Some(f) = find_corner(&resp, level, Side::Lower, start, 1e-9, false)? else {
                break;
            };
            let ratio = f / f_t;
            if libm::fabs(ratio - 1.0) < 0.002 {
                break;
            }
            free(&mut caps, ratio);
        }
        Ok((caps, f_t))
    }
}
