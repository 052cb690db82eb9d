//! Tests of the table decomposition: random and symmetric tables keep
//! their function, the count of ones and the weight tables meet the published
//! AND counts.

use super::*;
use proptest::prelude::*;

fn value(net: &Network, l: Lit, x: u64) -> bool {
    net.simulate(x)[l.node] ^ l.neg
}

fn check(n: usize, tables: &[TruthTable]) -> Result<(), TestCaseError> {
    let mut net = Network::new(n);
    let refs: Vec<&TruthTable> = tables.iter().collect();
    let lits = tables_into(&mut net, &refs);
    for x in 0..1u64 << n {
        let v = net.simulate(x);
        for (t, l) in tables.iter().zip(&lits) {
            prop_assert_eq!(v[l.node] ^ l.neg, t.get(x as usize), "row {}", x);
        }
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(96))]
    /// Random tables: the network computes every table on every row.
    #[test]
    fn random_tables_keep_their_function(
        (n, bits) in (0usize..=9, 1usize..=4).prop_flat_map(|(n, m)| {
            (Just(n), prop::collection::vec(prop::collection::vec(any::<bool>(), 1 << n), m))
        })
    ) {
        let tables: Vec<TruthTable> = bits
            .iter()
            .map(|b| TruthTable::from_fn(n, |x| b[x as usize]))
            .collect();
        check(n, &tables)?;
    }

    /// Random symmetric tables (a value per count of ones), mixed with a
    /// random one: the symmetric route keeps the function too.
    #[test]
    fn symmetric_tables_keep_their_function(
        (n, profiles, other) in (3usize..=9).prop_flat_map(|n| {
            (
                Just(n),
                prop::collection::vec(prop::collection::vec(any::<bool>(), n + 1), 1..=3),
                prop::collection::vec(any::<bool>(), 1 << n),
            )
        })
    ) {
        let mut tables: Vec<TruthTable> = profiles
            .iter()
            .map(|p| TruthTable::from_fn(n, |x| p[x.count_ones() as usize]))
            .collect();
        tables.push(TruthTable::from_fn(n, |x| other[x as usize]));
        check(n, &tables)?;
    }
}

/// The count of ones of `n` bits takes `n - popcount(n)` ANDs (Boyar and
/// Peralta, TCS 2008, the bound they prove tight; from memory) and is
/// right on every row.
#[test]
fn count_of_ones_meets_the_published_and_count() {
    for n in 1..=12usize {
        let mut net = Network::new(n);
        let bits: Vec<Lit> = (0..n).map(|j| net.input(j)).collect();
        net.outputs = count_ones(&mut net, &bits);
        assert_eq!(and_count(&net), n - n.count_ones() as usize, "n = {n}");
        for x in 0..1u64 << n {
            let mut w = 0u64;
            for (i, &l) in net.outputs.iter().enumerate() {
                w |= (value(&net, l, x) as u64) << i;
            }
            assert_eq!(w, x.count_ones() as u64, "n = {n}, row {x}");
        }
    }
}

/// The weight function (binary count of ones) given as a table reaches
/// the count's `n - popcount(n)` ANDs (Boyar and Peralta, TCS 2008; from
/// memory): the counts past `n` are filled so each output is a count
/// bit itself.
#[test]
fn weight_tables_cost_what_the_count_costs() {
    for n in 3..=12usize {
        let bits = (usize::BITS - n.leading_zeros()) as usize;
        let tables: Vec<TruthTable> = (0..bits)
            .map(|j| TruthTable::from_fn(n, |x| (x.count_ones() >> j) & 1 == 1))
            .collect();
        let refs: Vec<&TruthTable> = tables.iter().collect();
        let mut net = Network::new(n);
        net.outputs = tables_into(&mut net, &refs);
        assert_eq!(and_count(&net), n - n.count_ones() as usize, "n = {n}");
    }
}

/// The algebraic normal form of small functions (common practice):
/// `x0 & x1` is the one monomial `{0, 1}`, `!x0` is `1 ^ x0`, and
/// majority of three is `x0x1 ^ x0x2 ^ x1x2`.
#[test]
fn algebraic_normal_form_of_small_functions() {
    assert_eq!(anf(0b1000, 2), 0b1000);
    assert_eq!(anf(0b0101, 2), 0b0011);
    assert_eq!(anf(0b1110_1000, 3), (1 << 3) | (1 << 5) | (1 << 6));
}

/// Parity needs no AND and a single AND needs one: the diagram's free
/// steps (an affine step is an XOR) and its sharing across outputs
/// (the same table twice costs once). Common practice.
#[test]
fn affine_steps_are_free_and_outputs_share() {
    let n = 8;
    let parity = TruthTable::from_fn(n, |x| x.count_ones() % 2 == 1);
    let and2 = TruthTable::from_fn(n, |x| x & 3 == 3);
    let mut net = Network::new(n);
    net.outputs = tables_into(&mut net, &[&parity, &and2, &and2, &parity]);
    assert_eq!(and_count(&net), 1);
    assert_eq!(net.outputs[1], net.outputs[2]);
}
