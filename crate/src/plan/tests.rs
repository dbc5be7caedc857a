//! One way from options to a run: defaults, errors that name the option, comparisons, the way
//! back from a configuration, and the memory estimate.

use super::memory::{Estimate, Face, Shape};
use super::*;
use crate::tune::policy::Freeze;
use crate::tune::score::Score;
use proptest::prelude::*;

/// `options` with seed 17 unless they give one.
fn seeded(options: Options) -> Options {
    Options { seed: options.seed.or(Some(17)), ..options }
}

#[test]
fn the_defaults_are_a_random_walk_tuned_by_bayesian_optimisation() {
    let config = seeded(Options::default()).resolve(4).expect("valid");
    assert_eq!(
        config,
        RunConfig {
            chains: 4,
            warmup: 1000,
            draws: 1000,
            seed: 17,
            pilot: 200,
            settings: Settings::RandomWalk { scale: 2.38 / 2.0, blend: 1.0 },
            tuning: Tuning::Bo(BoConfig { score: Score::EssPerEval, trials: 100, window: 100, freeze: Freeze::Best }),
        }
    );
    assert_eq!(seeded(Options::standard()).resolve(4), Ok(config), "the written-out defaults are the defaults");
}

#[test]
fn each_kernel_is_scored_by_its_own_default_unless_told() {
    let score = |options: Options| match seeded(options).resolve(2).expect("valid").tuning {
        Tuning::Bo(bo) => bo.score,
        other => panic!("not tuned by BO: {other:?}"),
    };
    assert_eq!(score(Options { sampler: Some(Kind::Slice), ..Options::default() }), Score::JumpPerEval);
    assert_eq!(score(Options { sampler: Some(Kind::RandomWalk), ..Options::default() }), Score::EssPerEval);
    assert_eq!(
        score(Options { sampler: Some(Kind::Slice), score: Some(Score::Acf), ..Options::default() }),
        Score::Acf
    );
}

#[test]
fn a_kernel_setting_given_means_no_tuning_unless_a_method_is_named() {
    let own = Options { scale: Some(0.5), ..Options::default() };
    let config = seeded(own.clone()).resolve(3).expect("valid");
    assert_eq!(config.tuning, Tuning::None);
    assert_eq!(config.settings, Settings::RandomWalk { scale: 0.5, blend: 1.0 });
    let tuned = seeded(Options { tune: Some(Method::Rm), trials: Some(8), window: Some(40), ..own }).resolve(3);
    assert_eq!(tuned.expect("valid").tuning, Tuning::Rm { steps: 320 });
}

#[test]
fn names_are_parsed_strictly() {
    assert_eq!("slice".parse::<Kind>(), Ok(Kind::Slice));
    assert_eq!("slcie".parse::<Kind>(), Err("unknown sampler `slcie`: use rwm, slice".to_string()));
    assert_eq!("grid".parse::<Method>(), Err("unknown tuning method `grid`: use none, bo, rm, am".to_string()));
    assert_eq!(Phase::WarmUp.to_string(), "warm-up");
    assert_eq!(serde_json::to_string(&Phase::WarmUp).expect("serialises"), "\"warm-up\"");
    assert_eq!(serde_json::from_str::<Score>("\"jump-per-eval\"").expect("reads"), Score::JumpPerEval);
    assert!(serde_json::from_str::<Freeze>("\"worst\"").is_err());
}

#[test]
fn every_refusal_names_the_option_at_fault() {
    let slice = || Options { sampler: Some(Kind::Slice), ..Options::default() };
    let cases: Vec<(Options, Option<Opt>, &str)> = vec![
        (
            Options { chains: Some(0), ..Options::default() },
            Some(Opt::Chains),
            "the number of chains must be from 1 to 64, not 0",
        ),
        (Options { draws: Some(3), ..Options::default() }, Some(Opt::Draws), "not 3"),
        (Options { draws: Some(5_000_000_000), ..Options::default() }, Some(Opt::Draws), "not 5000000000"),
        (Options { warmup: Some(u64::MAX), ..Options::default() }, Some(Opt::Warmup), "warm-up"),
        (Options { pilot: Some(2_000_000), ..Options::default() }, Some(Opt::Pilot), "pilot sweeps"),
        (Options { seed: Some(1 << 53), ..Options::default() }, Some(Opt::Seed), "at most 2^53 − 1"),
        (Options { scale: Some(f64::NAN), ..Options::default() }, Some(Opt::Scale), "not NaN"),
        (Options { blend: Some(1.5), ..Options::default() }, Some(Opt::Blend), "between 0 and 1"),
        (Options { width: Some(0.0), ..slice() }, Some(Opt::Width), "slice width"),
        (Options { stepout: Some(0), ..slice() }, Some(Opt::Stepout), "not 0"),
        (Options { stepout: Some(1 << 40), ..slice() }, Some(Opt::Stepout), "not 1099511627776"),
        (Options { width: Some(2.0), ..Options::default() }, Some(Opt::Width), "a setting of the slice sampler"),
        (Options { scale: Some(2.0), ..slice() }, Some(Opt::Scale), "a setting of random-walk Metropolis"),
        (Options { tune: Some(Method::Rm), ..slice() }, Some(Opt::Tune), "adapt a random walk"),
        (Options { trials: Some(0), ..Options::default() }, Some(Opt::Trials), "tuning trials"),
        (Options { window: Some(2), ..Options::default() }, Some(Opt::Window), "from 4 to 100000, not 2"),
        (Options { tune: Some(Method::Am), window: Some(0), ..Options::default() }, Some(Opt::Window), "not 0"),
        (
            Options { tune: Some(Method::Am), trials: Some(1 << 20), window: Some(1 << 20), ..Options::default() },
            Some(Opt::Trials),
            "trials × steps per trial",
        ),
    ];
    for (options, option, fragment) in cases {
        let error = seeded(options.clone()).resolve(2).expect_err("refused");
        assert_eq!(error.option, option, "{options:?}: {error:?}");
        assert!(error.message.contains(fragment), "{options:?}: {:?} lacks {fragment:?}", error.message);
    }
}

#[test]
fn a_comparison_spends_the_options_budget_on_every_method_that_applies() {
    let options = seeded(Options { tune: Some(Method::Rm), trials: Some(8), window: Some(40), ..Options::default() });
    let plan = Plan::new(&options, 2, true).expect("valid");
    let methods: Vec<Method> = plan.runs.iter().map(|r| r.tuning.method()).collect();
    assert_eq!(methods, [Method::None, Method::Bo, Method::Rm, Method::Am]);
    assert_eq!(plan.chosen, 2);
    assert_eq!(plan.config().tuning, Tuning::Rm { steps: 320 });
    match &plan.runs[1].tuning {
        Tuning::Bo(bo) => assert_eq!((bo.trials, bo.window, bo.score), (8, 40, Score::EssPerEval)),
        other => panic!("{other:?}"),
    }
    assert_eq!(plan.runs[3].tuning, Tuning::Am { steps: 320 });
    assert!(plan.runs.iter().all(|r| r.seed == 17 && r.chains == 4 && r.settings == plan.runs[0].settings));

    let slice = Plan::new(&seeded(Options { sampler: Some(Kind::Slice), ..Options::default() }), 2, true);
    let slice = slice.expect("valid");
    let methods: Vec<Method> = slice.runs.iter().map(|r| r.tuning.method()).collect();
    assert_eq!(methods, [Method::None, Method::Bo], "only these tune a slice sampler");
    assert_eq!(slice.chosen, 1);
    // Without a seed the runs still share one.
    let unseeded = Plan::new(&Options::default(), 2, true).expect("valid");
    assert!(unseeded.runs.iter().all(|r| r.seed == unseeded.runs[0].seed));
    // Options that suit the chosen method but not another are refused, naming the option.
    let narrow = Options { tune: Some(Method::Rm), window: Some(2), ..Options::default() };
    assert_eq!(Plan::new(&narrow, 2, false).map(|p| p.runs.len()), Ok(1));
    assert_eq!(Plan::new(&narrow, 2, true).expect_err("BO needs 4 steps").option, Some(Opt::Window));
}

#[test]
fn a_mixture_from_a_link_runs_but_is_not_compared() {
    let config = RunConfig {
        settings: Settings::Mixture {
            components: vec![
                (Settings::Slice { width: 1.0, stepout: 5 }, 1.0),
                (Settings::Slice { width: 4.0, stepout: 5 }, 2.0),
            ],
        },
        tuning: Tuning::None,
        ..seeded(Options::default()).resolve(1).expect("valid")
    };
    assert_eq!(Options::from_config(&config, Some(1)), None);
    assert_eq!(Plan::of_config(config.clone(), 1, false).map(|p| p.runs), Ok(vec![config.clone()]));
    assert_eq!(Plan::of_config(config, 1, true).expect_err("refused").option, Some(Opt::Compare));
}

#[test]
fn an_adaptation_budget_from_a_link_is_split_into_trials_of_at_most_the_default_window() {
    let rm =
        |steps| RunConfig { tuning: Tuning::Rm { steps }, ..seeded(Options::default()).resolve(2).expect("valid") };
    let window = |steps| Options::from_config(&rm(steps), Some(2)).map(|o| (o.trials, o.window));
    assert_eq!(window(10_000), Some((Some(100), Some(100))));
    assert_eq!(window(320), Some((Some(4), Some(80))));
    assert_eq!(window(101), Some((Some(101), Some(1))), "a prime budget has no window of 4 or more");
    let plan = Plan::of_config(rm(320), 2, true).expect("valid");
    match &plan.runs[1].tuning {
        Tuning::Bo(bo) => assert_eq!(bo.trials * bo.window, 320, "the same budget"),
        other => panic!("{other:?}"),
    }
    assert_eq!(Plan::of_config(rm(101), 2, true).expect_err("no BO budget").option, Some(Opt::Window));
}

fn any_options() -> impl Strategy<Value = Options> {
    let kind = prop_oneof![Just(Kind::RandomWalk), Just(Kind::Slice)];
    let method =
        prop::option::of(prop_oneof![Just(Method::None), Just(Method::Bo), Just(Method::Rm), Just(Method::Am)]);
    let score = prop::option::of(prop_oneof![Just(Score::Acf), Just(Score::EssPerEval), Just(Score::JumpPerEval)]);
    let freeze = prop::option::of(prop_oneof![Just(Freeze::Best), Just(Freeze::Mixture)]);
    let own = prop::option::of((0.01f64..10.0, 0.0f64..=1.0, 1u64..100));
    let counts = (prop::option::of(1u64..300), prop::option::of(4u64..500), prop::option::of(1u64..9));
    let sizes = (prop::option::of(0u64..3000), prop::option::of(4u64..3000), prop::option::of(0u64..400));
    (kind, method, score, freeze, own, counts, sizes, any::<u64>()).prop_map(
        |(kind, tune, score, freeze, own, (trials, window, chains), (warmup, draws, pilot), seed)| {
            let mut options = Options {
                sampler: Some(kind),
                tune,
                score,
                freeze,
                trials,
                window,
                chains,
                warmup,
                draws,
                pilot,
                seed: Some(seed % (MAX_SEED + 1)),
                ..Options::default()
            };
            if let Some((a, b, stepout)) = own {
                match kind {
                    Kind::RandomWalk => (options.scale, options.blend) = (Some(a), Some(b)),
                    Kind::Slice => (options.width, options.stepout) = (Some(a), Some(stepout)),
                }
            }
            options
        },
    )
}

proptest! {
    /// Every run options can make maps back onto options that make exactly that run: so a link
    /// fills the page's form with the run it carries, and a comparison from a link is the one
    /// its options would make.
    #[test]
    fn options_from_a_configuration_resolve_to_the_same_configuration(options in any_options(), dim in 1usize..30) {
        if let Ok(config) = options.resolve(dim) {
            let back = Options::from_config(&config, Some(dim)).expect("not a mixture");
            prop_assert_eq!(back.resolve(dim), Ok(config.clone()));
            let blind = Options::from_config(&config, None).expect("not a mixture");
            prop_assert_eq!(blind.resolve(dim), Ok(config));
        }
    }
}

const GIB: f64 = (1u64 << 30) as f64;

fn estimate(options: Options, shape: Shape) -> Estimate {
    let plan = Plan::new(&seeded(options), shape.dim, false).expect("valid");
    Estimate::of_plan(&plan, shape, Face::Native)
}

#[test]
fn a_long_pilot_costs_no_more_memory_than_a_short_one() {
    // 2,000 coordinates and a million pilot sweeps once needed 8 GB for the pilot's rows.
    let shape = Shape { dim: 2000, columns: 2000 };
    let short = estimate(Options { pilot: Some(200), ..Options::default() }, shape);
    let long = estimate(Options { pilot: Some(1_000_000), ..Options::default() }, shape);
    assert_eq!(long, short);
    let pilot = long.parts.iter().find(|p| p.phase == Some(Phase::Pilot)).expect("a pilot part");
    // One packed covariance per chain, plus the pooled moments and the geometry.
    assert!(long.bytes(pilot) < 0.2 * GIB, "{}", long.bytes(pilot));
    assert!(long.check(2.0 * GIB).is_ok(), "fits the default limit: {}", long.peak() / GIB);
}

#[test]
fn the_guard_names_the_largest_part_and_the_option_that_lowers_it() {
    let shape = Shape { dim: 2000, columns: 2000 };
    let cases = [
        (
            Options { window: Some(100_000), ..Options::default() },
            "the trial windows",
            Opt::Window,
            4.0 * 100_000.0 * 2000.0 * 8.0,
        ),
        (Options { trials: Some(10_000), ..Options::default() }, "the surrogate", Opt::Trials, 6.0 * 1e8 * 8.0),
        (
            Options { draws: Some(1_000_000), tune: Some(Method::None), ..Options::default() },
            "the draws",
            Opt::Draws,
            4.0 * 1e6 * 2000.0 * 8.0,
        ),
        (
            Options { chains: Some(64), tune: Some(Method::Am), ..Options::default() },
            "the adaptation",
            Opt::Chains,
            64.0 * 4e6 * 8.0,
        ),
    ];
    for (options, what, option, at_least) in cases {
        let too_large = estimate(options.clone(), shape).check(2.0 * GIB).expect_err("refused");
        assert_eq!((too_large.part.what, too_large.part.lowered_by), (what, option), "{options:?}");
        assert!(too_large.part_bytes >= at_least && too_large.peak >= too_large.part_bytes, "{too_large:?}");
        let message = too_large.message("--max-memory 2");
        assert!(message.starts_with("this run would need about ") && message.contains(what), "{message}");
    }
}

#[test]
fn the_peak_is_what_is_held_throughout_and_the_largest_phase() {
    let shape = Shape { dim: 10, columns: 12 };
    let e = estimate(Options { window: Some(50_000), draws: Some(100), ..Options::default() }, shape);
    let tuning: f64 = e.parts.iter().filter(|p| p.phase == Some(Phase::Tuning)).map(|p| e.bytes(p)).sum();
    let always: f64 = e.parts.iter().filter(|p| p.phase.is_none()).map(|p| e.bytes(p)).sum();
    assert_eq!(e.peak(), always + tuning, "trial windows dwarf the 100 draws");
    // A comparison keeps the chosen method's draws while the others run.
    let options = seeded(Options { draws: Some(100_000), ..Options::default() });
    let single = Estimate::of_plan(&Plan::new(&options, 10, false).expect("valid"), shape, Face::Native);
    let compared = Estimate::of_plan(&Plan::new(&options, 10, true).expect("valid"), shape, Face::Native);
    assert!((compared.peak() - single.peak() - 4.0 * 100_000.0 * 12.0 * 8.0).abs() < 1.0);
    // The page copies draws into JavaScript and makes their CSV text.
    let page = Estimate::of_plan(&Plan::new(&options, 10, false).expect("valid"), shape, Face::Page);
    assert!(page.peak() > 3.0 * single.peak(), "{} vs {}", page.peak(), single.peak());
}
