//! Invariants checked over generated inputs (proptest).

use std::sync::OnceLock;

use acceptance::{demo_market, fit_demo};
use linfa::ParamGuard;
use model::adjustment::{SubjectTerms, model_lines};
use model::appraisal::{FitSettings, MarketFit};
use model::condition::Condition;
use model::hedonic::{Attributes, HedonicParams};
use model::market::Market;
use proptest::prelude::*;

fn shared() -> &'static (Market, MarketFit) {
    static SHARED: OnceLock<(Market, MarketFit)> = OnceLock::new();
    SHARED.get_or_init(|| {
        let market = demo_market(6_000, 21);
        let fit = fit_demo(&market, "Quellmark", "Tessel", FitSettings::default());
        (market, fit)
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn a_comparable_identical_to_the_subject_needs_no_adjustment(pick in 0usize..10_000) {
        let (market, fit) = shared();
        let row = fit.included_rows[pick % fit.included_rows.len()];
        let subject = SubjectTerms {
            model_year: market.model_year[row],
            miles: market.miles[row],
            variant: market.variant[row],
            condition: market.condition[row],
        };
        for line in model_lines(&fit.model, market, row, &subject) {
            prop_assert!(line.amount.abs() < 1e-9, "{:?}", line);
        }
    }

    #[test]
    fn more_miles_never_raise_a_value_when_the_slope_is_negative(
        age in 0.0f64..12.0,
        miles in 0.0f64..250_000.0,
        extra in 0.0f64..100_000.0,
        variant_pick in 0usize..3,
    ) {
        let (_, fit) = shared();
        prop_assume!(fit.model.miles_slope() < 0.0);
        let variant = fit.model.design().variants[variant_pick % fit.model.design().variants.len()];
        let at = |m: f64| fit.model.estimate(&Attributes { age_years: age, miles: m, variant, condition: Condition::Used }, 0.8).median;
        prop_assert!(at(miles + extra) <= at(miles));
    }

    #[test]
    fn row_order_does_not_change_a_fit(seed in 0u64..1_000) {
        let (market, fit) = shared();
        let mut rows = fit.included_rows.clone();
        // A deterministic permutation from the seed.
        let n = rows.len();
        for i in (1..n).rev() {
            let j = ((seed.wrapping_mul(6_364_136_223_846_793_005).wrapping_add((i as u64).wrapping_mul(1_442_695_040_888_963_407))) % (i as u64 + 1)) as usize;
            rows.swap(i, j);
        }
        let params = HedonicParams::new(fit.as_of).check().unwrap();
        let refit = params.fit(market, &rows).unwrap();
        for (a, b) in refit.coefficients().iter().zip(fit.model.coefficients()) {
            prop_assert!((a - b).abs() <= 1e-9 * (1.0 + b.abs()), "{} vs {}", a, b);
        }
        prop_assert!((refit.residual_sd() - fit.model.residual_sd()).abs() < 1e-12);
    }

    #[test]
    fn the_value_band_contains_the_indicated_value(pick in 0usize..10_000, level in 0.5f64..0.99) {
        let (market, fit) = shared();
        let row = fit.included_rows[pick % fit.included_rows.len()];
        let mut request = model::appraisal::AppraisalRequest::new(model::subject::Subject::from_listing(&market.listing(row)));
        request.level = level;
        let a = model::appraisal::appraise(market, fit, &request).unwrap();
        let r = &a.reconciliation;
        prop_assert!(r.value_band.lower <= r.indicated_value && r.indicated_value <= r.value_band.upper);
        let total: f64 = r.weights.iter().sum();
        prop_assert!(r.weights.is_empty() || (total - 1.0).abs() < 1e-9);
        let m = &a.model_estimate;
        prop_assert!(m.confidence_interval.lower <= m.median && m.median <= m.confidence_interval.upper);
        prop_assert!(m.prediction_interval.lower <= m.confidence_interval.lower);
        prop_assert!(m.prediction_interval.upper >= m.confidence_interval.upper);
    }
}
