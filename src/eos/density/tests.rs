use proptest::prelude::*;

use super::*;
use crate::eos::constants::MIN_PRESSURE_PA;
use crate::eos::ideal_gas_density;

/// Asserts a density to the REFERENCES.md tolerance, 0.01 %.
fn assert_density(temperature_k: f64, pressure_pa: f64, expected: f64) -> State {
    let state = density(temperature_k, pressure_pa).unwrap();
    let relative = state.density_kg_per_m3 / expected - 1.0;
    assert!(
        relative.abs() < 1e-4,
        "{temperature_k} K, {pressure_pa} Pa: {} kg/m³, expected {expected} ({relative:.2e})",
        state.density_kg_per_m3
    );
    state
}

/// The saturation pressure at a temperature, from the full equation.
fn saturation_pressure(temperature_k: f64) -> f64 {
    let (liquid, vapour) = saturated_densities(temperature_k);
    saturation(&Isotherm::new(temperature_k), liquid, vapour)
        .unwrap()
        .pressure_pa
}

#[test]
fn reference_densities() {
    // computed with the Span–Wagner equation; the same values come from CoolProp —
    // REFERENCES.md, "CO2 density".
    assert_eq!(assert_density(300.0, 1e6, 18.5794).phase, Phase::Gas);
    assert_eq!(
        assert_density(313.15, 8e6, 277.90).phase,
        Phase::Supercritical
    );
    assert_eq!(
        assert_density(313.15, 10e6, 628.61).phase,
        Phase::Supercritical
    );
    assert_eq!(assert_density(273.15, 101_325.0, 1.9768).phase, Phase::Gas);
    assert_eq!(assert_density(288.15, 101_325.0, 1.8718).phase, Phase::Gas);
    // 60 °F = 288.705556 K (read: NIST SP 811, REFERENCES.md "Units").
    assert_eq!(
        assert_density(288.705_556, 101_325.0, 1.8682).phase,
        Phase::Gas
    );
}

#[test]
fn liquid_and_dense_states() {
    // computed with CoolProp 8.0.0 (PropsSI "D", same Span–Wagner equation).
    assert_eq!(
        assert_density(250.0, 5e6, 1_058.860_082_6).phase,
        Phase::Liquid
    );
    assert_eq!(
        assert_density(280.0, 10e6, 938.224_692_2).phase,
        Phase::Liquid
    );
    assert_eq!(
        assert_density(350.0, 100e6, 1_027.733_182_4).phase,
        Phase::Supercritical
    );
    assert_eq!(
        assert_density(1000.0, 800e6, 1_129.164_754_1).phase,
        Phase::Supercritical
    );
    assert_eq!(assert_density(310.0, 5e6, 116.129_222_6).phase, Phase::Gas);
    assert_eq!(
        assert_density(310.0, 10e6, 685.773_206_6).phase,
        Phase::Supercritical
    );
}

#[test]
fn critical_point_is_supercritical() {
    // At (Tc, pc) the density is only fixed to the cube root of the pressure: CoolProp
    // 8.0.0 gives 480.99 kg/m³, close to ρc = 467.6 (read: Span & Wagner 1996 constants).
    let state = density(CRITICAL_TEMPERATURE_K, CRITICAL_PRESSURE_PA).unwrap();
    assert_eq!(state.phase, Phase::Supercritical);
    assert!((state.density_kg_per_m3 / 480.99 - 1.0).abs() < 2e-4);
}

#[test]
fn phase_flips_across_the_saturation_pressure() {
    // Saturated densities computed with CoolProp 8.0.0 (PropsSI "D" at Q = 0 and 1).
    for (t, liquid, vapour) in [
        (250.0, 1_045.972_130_2, 46.644_014_5),
        (300.0, 679.239_165_2, 268.583_657_4),
    ] {
        let ps = saturation_pressure(t);
        for f in [1e-8, 1e-4, 1e-3, 4e-3, 6e-3] {
            let below = density(t, ps * (1.0 - f)).unwrap();
            let above = density(t, ps * (1.0 + f)).unwrap();
            assert_eq!(
                (below.phase, above.phase),
                (Phase::Gas, Phase::Liquid),
                "{t} K, {f}"
            );
            if f < 1e-6 {
                assert!((below.density_kg_per_m3 / vapour - 1.0).abs() < 1e-6);
                assert!((above.density_kg_per_m3 / liquid - 1.0).abs() < 1e-6);
            }
        }
    }
}

#[test]
fn state_on_the_saturation_line_is_refused() {
    // Saturation pressure at 250 K computed with CoolProp 8.0.0: 1785044.2428 Pa.
    let ps = saturation_pressure(250.0);
    assert!((ps / 1_785_044.242_8 - 1.0).abs() < 1e-8);
    for p in [ps, ps * (1.0 + 5e-10), ps * (1.0 - 5e-10)] {
        let error = density(250.0, p).unwrap_err();
        assert_eq!(
            error,
            EosError::OnSaturationLine {
                temperature_k: 250.0,
                saturation_pressure_pa: ps
            }
        );
        assert!(
            error.to_string().contains("saturation pressure 1785044 Pa"),
            "{error}"
        );
    }
}

#[test]
fn within_microkelvins_of_the_critical_point_states_still_solve() {
    // There the saturation solve gives up and the ancillary picks the phase; whichever it
    // picks, the answer must be a true root on a stable branch.
    for dt in [1e-5, 3e-6, 1e-6, 1e-7, 1e-9] {
        let t = CRITICAL_TEMPERATURE_K - dt;
        let ps = vapour_pressure(t);
        for f in [-1e-3, -1e-6, -1e-7, 0.0, 1e-7, 1e-6, 1e-3] {
            let p = ps * (1.0 + f);
            let state = density(t, p).unwrap();
            let at = Isotherm::new(t).pressure(state.density_kg_per_m3);
            assert!(
                ((at.pressure - p) / p).abs() < 1e-9 && at.slope > 0.0,
                "{t} K, {p} Pa"
            );
        }
    }
}

#[test]
fn phase_names() {
    assert_eq!(density(400.0, 5e6).unwrap().phase, Phase::Gas);
    assert_eq!(density(400.0, 8e6).unwrap().phase, Phase::Supercritical);
    assert_eq!(density(290.0, 8e6).unwrap().phase, Phase::Liquid);
    assert_eq!(Phase::Supercritical.to_string(), "supercritical");
}

#[test]
fn compressibility_factor_and_ideal_gas_limit() {
    let state = density(300.0, 1e6).unwrap();
    let z = 1e6 / (state.density_kg_per_m3 * SPECIFIC_GAS_CONSTANT * 300.0);
    assert!((state.compressibility_factor - z).abs() < 1e-15);
    // The gas is ideal in the limit of zero pressure.
    for t in [220.0, 300.0, 1100.0] {
        let state = density(t, 1.0).unwrap();
        assert!((state.density_kg_per_m3 / ideal_gas_density(t, 1.0) - 1.0).abs() < 1e-5);
        assert!((state.compressibility_factor - 1.0).abs() < 1e-5);
    }
    let tiny = density(1100.0, MIN_PRESSURE_PA).unwrap();
    assert!(tiny.density_kg_per_m3 > 0.0 && (tiny.compressibility_factor - 1.0).abs() < 1e-12);
}

#[test]
fn range_errors_name_the_bound_and_the_value() {
    let cases = [
        (
            1200.0,
            1e6,
            "temperature 1200 K is outside the Span–Wagner range 216.592–1100 K",
        ),
        (
            200.0,
            1e6,
            "temperature 200 K is outside the Span–Wagner range 216.592–1100 K: CO2 is solid \
             below the triple point",
        ),
        (f64::NAN, 1e6, "temperature is not a number"),
        (
            f64::INFINITY,
            1e6,
            "temperature inf K is outside the Span–Wagner range 216.592–1100 K",
        ),
        (
            300.0,
            9e8,
            "pressure 900000000 Pa is outside the Span–Wagner range 0 < p ≤ 800 MPa",
        ),
        (
            300.0,
            0.0,
            "pressure 0 Pa is outside the Span–Wagner range 0 < p ≤ 800 MPa",
        ),
        (
            300.0,
            -1.0,
            "pressure -1 Pa is outside the Span–Wagner range 0 < p ≤ 800 MPa",
        ),
        (300.0, f64::NAN, "pressure is not a number"),
        (
            300.0,
            1e13,
            "pressure 1e13 Pa is outside the Span–Wagner range 0 < p ≤ 800 MPa",
        ),
        (
            300.0,
            1e-310,
            "pressure 1e-310 Pa is below 1e-300 Pa, too low for a representable density",
        ),
    ];
    for (t, p, message) in cases {
        assert_eq!(density(t, p).unwrap_err().to_string(), message);
    }
    assert_eq!(
        density(1100.0001, 1e6),
        Err(EosError::TemperatureOutOfRange {
            temperature_k: 1100.0001
        })
    );
    assert!(density(1100.0, 800e6).is_ok() && density(TRIPLE_POINT_TEMPERATURE_K, 1e5).is_ok());
}

#[test]
fn solid_states_are_refused() {
    // Melting pressure at 250 K computed with CoolProp 8.0.0: 182.0759 MPa.
    assert!(density(250.0, 182.0e6).is_ok());
    let error = density(250.0, 182.1e6).unwrap_err();
    assert!(matches!(error, EosError::Solid { .. }));
    assert!(
        error
            .to_string()
            .contains("above the melting pressure 182075910 Pa"),
        "{error}"
    );
}

/// Temperatures from the triple point to just below Tc: every 0.25 K, every 0.01 K over the
/// loops near the liquid spinodal, and closing in on Tc down to 1 nK.
fn subcritical_temperatures() -> Vec<f64> {
    let t_t = TRIPLE_POINT_TEMPERATURE_K;
    let mut temperatures: Vec<f64> = (0..=345).map(|i| t_t + 0.25 * f64::from(i)).collect();
    temperatures.extend((0..=40).map(|i| 303.6 + 0.01 * f64::from(i)));
    temperatures.extend((0..=30).map(|i| CRITICAL_TEMPERATURE_K - 0.1 * 0.5_f64.powi(i)));
    temperatures
}

/// Whether ∂p/∂ρ is positive at the first of `n` densities spread over `bracket`, and how
/// often its sign changes.
fn slope_sign_changes(isotherm: &Isotherm, bracket: (f64, f64), n: u32) -> (bool, usize) {
    let mut signs = (1..=n).map(|i| {
        let rho = bracket.0 + (bracket.1 - bracket.0) * f64::from(i) / f64::from(n);
        isotherm.pressure(rho).slope > 0.0
    });
    let first = signs.next().unwrap_or(false);
    let (mut last, mut changes) = (first, 0);
    for sign in signs {
        changes += usize::from(sign != last);
        last = sign;
    }
    (first, changes)
}

#[test]
fn brackets_hold_one_rising_branch_each() {
    // What `Branch::below_root` relies on: within the vapour bracket the isotherm rises, then
    // (if at all) falls; within the liquid bracket it falls (if at all), then rises.
    for t in subcritical_temperatures() {
        let isotherm = Isotherm::new(t);
        let (liquid, vapour) = saturated_densities(t);
        let sat = saturation(&isotherm, liquid, vapour);
        let (vapour_bracket, liquid_bracket) = match sat {
            Some(sat) if t >= LOOPS_NEAR_SPINODAL_K => (
                (0.0, sat.vapour_density),
                (sat.liquid_density, DENSITY_CEILING_KG_PER_M3),
            ),
            _ => ancillary_brackets(liquid, vapour),
        };
        let (rising, changes) = slope_sign_changes(&isotherm, vapour_bracket, 2000);
        assert!(rising && changes <= 1, "{t} K vapour: {changes} changes");
        let (rising, changes) = slope_sign_changes(&isotherm, liquid_bracket, 2000);
        assert_eq!(changes, usize::from(!rising), "{t} K liquid");
        // Saturated phases lie inside the ancillary brackets, so do the roots near them.
        if let (Some(sat), true) = (sat, t < LOOPS_NEAR_SPINODAL_K) {
            assert!(sat.vapour_density < vapour_bracket.1, "{t} K");
            assert!(sat.liquid_density > liquid_bracket.0, "{t} K");
        }
    }
}

#[test]
fn saturation_line_is_found_up_to_microkelvins_below_tc() {
    for t in subcritical_temperatures() {
        let (liquid, vapour) = saturated_densities(t);
        let found = saturation(&Isotherm::new(t), liquid, vapour).is_some();
        assert!(found || t > CRITICAL_TEMPERATURE_K - 5e-6, "{t} K");
    }
}

#[test]
fn supercritical_isotherms_rise_everywhere() {
    let mut temperatures = vec![
        CRITICAL_TEMPERATURE_K,
        304.1283,
        304.13,
        304.2,
        305.0,
        310.0,
    ];
    temperatures.extend((0..=40).map(|i| 320.0 + 20.0 * f64::from(i)));
    for t in temperatures {
        let (rising, changes) =
            slope_sign_changes(&Isotherm::new(t), (0.0, DENSITY_CEILING_KG_PER_M3), 1000);
        assert!(rising && changes == 0, "{t} K");
    }
}

#[test]
fn density_ceiling_is_beyond_every_fluid_state() {
    for i in 0..=200 {
        let t = TRIPLE_POINT_TEMPERATURE_K
            + (MAX_TEMPERATURE_K - TRIPLE_POINT_TEMPERATURE_K) * f64::from(i) / 200.0;
        let highest = melting_pressure(t).min(MAX_PRESSURE_PA);
        assert!(
            Isotherm::new(t)
                .pressure(DENSITY_CEILING_KG_PER_M3)
                .pressure
                > 2.0 * highest,
            "{t} K"
        );
    }
}

#[test]
fn ancillary_is_close_enough_to_the_saturation_line() {
    // The ancillary vapour pressure decides the phase outside NEAR_SATURATION, so it must be
    // far closer than that to the full equation's saturation pressure; its densities only
    // start the solvers.
    let (mut pressure, mut liquid_worst, mut vapour_worst) = (0.0_f64, 0.0_f64, 0.0_f64);
    for t in subcritical_temperatures() {
        let (liquid, vapour) = saturated_densities(t);
        let Some(sat) = saturation(&Isotherm::new(t), liquid, vapour) else {
            continue;
        };
        pressure = pressure.max((vapour_pressure(t) / sat.pressure_pa - 1.0).abs());
        liquid_worst = liquid_worst.max((liquid / sat.liquid_density - 1.0).abs());
        vapour_worst = vapour_worst.max((vapour / sat.vapour_density - 1.0).abs());
    }
    assert!(pressure < NEAR_SATURATION / 50.0, "{pressure}");
    assert!(
        liquid_worst < 0.007 && vapour_worst < 0.003,
        "{liquid_worst} {vapour_worst}"
    );
}

/// Any answer is a positive, finite density that gives back the pressure on a stable branch.
fn check_answer(temperature_k: f64, pressure_pa: f64) -> Result<(), TestCaseError> {
    if let Ok(state) = density(temperature_k, pressure_pa) {
        let rho = state.density_kg_per_m3;
        prop_assert!(rho.is_finite() && rho > 0.0);
        let at = Isotherm::new(temperature_k).pressure(rho);
        prop_assert!(
            ((at.pressure - pressure_pa) / pressure_pa).abs() <= 1e-9,
            "{at:?}"
        );
        prop_assert!(at.slope > 0.0);
        prop_assert!(state.compressibility_factor.is_finite());
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(1000))]

    #[test]
    fn arbitrary_inputs_never_panic(t in any::<f64>(), p in any::<f64>()) {
        check_answer(t, p)?;
    }

    #[test]
    fn states_in_range_give_back_their_pressure(t in 210.0..1110.0_f64, log_p in -4.0..9.0_f64) {
        check_answer(t, 10_f64.powf(log_p))?;
    }

    #[test]
    fn states_near_the_saturation_line(t in TRIPLE_POINT_TEMPERATURE_K..CRITICAL_TEMPERATURE_K, log_f in -12.0..-1.0_f64, above: bool) {
        let f = if above { 10_f64.powf(log_f) } else { -(10_f64.powf(log_f)) };
        check_answer(t, vapour_pressure(t) * (1.0 + f))?;
    }

    #[test]
    fn states_near_the_critical_point(dt in -0.5..0.5_f64, dp in -0.05..0.05_f64) {
        check_answer(CRITICAL_TEMPERATURE_K + dt, CRITICAL_PRESSURE_PA * (1.0 + dp))?;
    }
}
