//! Specs of well-known functions in two forms, as truth tables and as
//! expressions, for comparing what a table costs against its expression
//! (tests/tables.rs and examples/table_costs.rs), and the AES S-box from its
//! definition.

/// The spec's table string: bit i of the integer is f(i), most significant digit first.
pub fn hex_table(bits: &[bool]) -> String {
    let digits = (bits.len() / 4).max(1);
    let mut s = String::from("0x");
    for k in (0..digits).rev() {
        let v = (0..4).fold(0u32, |v, b| {
            v | (bits.get(4 * k + b).copied().unwrap_or(false) as u32) << b
        });
        s.push(char::from_digit(v, 16).unwrap());
    }
    s
}

fn header(name: &str, inputs: usize, outputs: usize) -> String {
    let ins: Vec<String> = (0..inputs).map(|i| format!("\"x{i}\"")).collect();
    let outs: Vec<String> = (0..outputs).map(|j| format!("\"y{j}\"")).collect();
    format!(
        "kind = \"function\"\nname = \"{name}\"\ninputs = [{}]\noutputs = [{}]\n",
        ins.join(", "),
        outs.join(", ")
    )
}

/// A spec whose output `y{j}` is bit `j` of `f(x)`, every output a table.
pub fn table_spec(name: &str, inputs: usize, outputs: usize, f: impl Fn(u64) -> u64) -> String {
    let values: Vec<u64> = (0..1u64 << inputs).map(f).collect();
    let mut s = header(name, inputs, outputs);
    s.push_str("[table]\n");
    for j in 0..outputs {
        let bits: Vec<bool> = values.iter().map(|v| (v >> j) & 1 == 1).collect();
        s.push_str(&format!("y{j} = \"{}\"\n", hex_table(&bits)));
    }
    s
}

/// A spec summing bits by column: `columns[c]` lists expressions of weight
/// `2^c`, reduced by full adders (carry `((a ^ c) & (b ^ c)) ^ c`, one AND)
/// and half adders into one bit per column, written as `[let]` definitions;
/// output `y{j}` is column `j`.
fn column_sum_spec(name: &str, inputs: usize, outputs: usize, columns: Vec<Vec<String>>) -> String {
    let mut cols: Vec<std::collections::VecDeque<String>> = columns
        .into_iter()
        .map(|c| c.into_iter().collect())
        .collect();
    let mut lets = Vec::new();
    let mut out = Vec::new();
    let mut c = 0;
    while c < cols.len() {
        while cols[c].len() >= 2 {
            let a = cols[c].pop_front().unwrap();
            let b = cols[c].pop_front().unwrap();
            let (s, k) = (format!("s{}", lets.len()), format!("k{}", lets.len()));
            if let Some(d) = cols[c].pop_front() {
                lets.push(format!("{s} = \"{a} ^ {b} ^ {d}\""));
                lets.push(format!("{k} = \"(({a} ^ {d}) & ({b} ^ {d})) ^ {d}\""));
            } else {
                lets.push(format!("{s} = \"{a} ^ {b}\""));
                lets.push(format!("{k} = \"{a} & {b}\""));
            }
            cols[c].push_back(s);
            if cols.len() == c + 1 {
                cols.push(Default::default());
            }
            cols[c + 1].push_back(k);
        }
        out.push(cols[c].pop_front().unwrap_or_else(|| "0".to_string()));
        c += 1;
    }
    let mut s = header(name, inputs, outputs);
    s.push_str("[let]\n");
    for l in &lets {
        s.push_str(l);
        s.push('\n');
    }
    s.push_str("[expr]\n");
    for j in 0..outputs {
        s.push_str(&format!(
            "y{j} = \"{}\"\n",
            out.get(j).map_or("0", |o| o.as_str())
        ));
    }
    s
}

/// Output bits of the weight function of `n` inputs.
pub fn weight_bits(n: usize) -> usize {
    (usize::BITS - n.leading_zeros()) as usize
}

/// The weight function (binary count of ones) of `n` inputs as a table.
pub fn weight_table(n: usize) -> String {
    table_spec(&format!("weight{n}"), n, weight_bits(n), |x| {
        x.count_ones() as u64
    })
}

/// The weight function of `n` inputs as an adder tree of expressions.
pub fn weight_expr(n: usize) -> String {
    let col = (0..n).map(|i| format!("x{i}")).collect();
    column_sum_spec(&format!("weight{n}"), n, weight_bits(n), vec![col])
}

/// The `w x w`-bit product (`a` = x0.., `b` = x{w}..) as a table.
pub fn multiplier_table(w: usize) -> String {
    let m = (1u64 << w) - 1;
    table_spec(&format!("mul{w}"), 2 * w, 2 * w, |x| (x & m) * (x >> w))
}

/// The `w x w`-bit product as schoolbook partial products summed by columns.
pub fn multiplier_expr(w: usize) -> String {
    let mut cols = vec![Vec::new(); 2 * w];
    for i in 0..w {
        for j in 0..w {
            cols[i + j].push(format!("(x{i} & x{})", w + j));
        }
    }
    column_sum_spec(&format!("mul{w}"), 2 * w, 2 * w, cols)
}

/// Multiplication in GF(2^8) modulo x^8 + x^4 + x^3 + x + 1 (FIPS 197,
/// section 4.2).
fn gf_mul(mut a: u8, mut b: u8) -> u8 {
    let mut r = 0u8;
    while b != 0 {
        if b & 1 == 1 {
            r ^= a;
        }
        let high = a & 0x80 != 0;
        a <<= 1;
        if high {
            a ^= 0x1b;
        }
        b >>= 1;
    }
    r
}

/// The AES S-box from its definition (FIPS 197, section 5.1.1): the
/// multiplicative inverse in GF(2^8) (0 maps to 0), then the affine map
/// `b ^ rotl(b, 1) ^ rotl(b, 2) ^ rotl(b, 3) ^ rotl(b, 4) ^ 0x63`.
pub fn aes_sbox() -> [u8; 256] {
    let mut s = [0u8; 256];
    for x in 0..=255u8 {
        let inv = if x == 0 {
            0
        } else {
            (1..=255u8).find(|&b| gf_mul(x, b) == 1).expect("a field")
        };
        s[x as usize] = inv
            ^ inv.rotate_left(1)
            ^ inv.rotate_left(2)
            ^ inv.rotate_left(3)
            ^ inv.rotate_left(4)
            ^ 0x63;
    }
    s
}

/// The AES S-box as an xor oracle spec: 8 inputs, 8 outputs, tables.
pub fn aes_sbox_table() -> String {
    let s = aes_sbox();
    table_spec("aes_sbox", 8, 8, |x| s[x as usize] as u64)
}
