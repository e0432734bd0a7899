//! Development probe: the branch points, their crowding and the β loop's layout precision at one
//! modulus (`cargo run --release --example layout_probe -- F0 1e90 132`).
use regwave::curve::cover::Curve;
use regwave::curve::cycles::crowding_bits;
use regwave::curve::periods::layout_curve;
use rug::Complex;

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let fam = regwave::family(&args[1]).unwrap();
    let bits: u32 = args[3].parse().unwrap();
    let a = Complex::with_val(bits, Complex::parse(&args[2]).unwrap());
    let curve = Curve::new(&fam, a.clone()).unwrap();
    let sing = curve.singular_points().unwrap();
    for s in &sing {
        println!(
            "{:?} {:.6e} {:.6e}",
            s.kind,
            s.z.real().to_f64(),
            s.z.imag().to_f64()
        );
    }
    println!("crowding {:.1} bits", crowding_bits(&sing));
    let t = std::time::Instant::now();
    match layout_curve(&fam, &a, &sing) {
        Ok(Some((c, s))) => {
            println!(
                "raised to {} bits, crowding {:.1}",
                c.modulus().prec().0,
                crowding_bits(&s)
            );
            for s in &s {
                println!(
                    "  {:?} {:.6e} {:.6e}",
                    s.kind,
                    s.z.real().to_f64(),
                    s.z.imag().to_f64()
                );
            }
        }
        Ok(None) => println!("no raise"),
        Err(e) => println!("{e}"),
    }
    let p = regwave::curve::periods::periods(&fam, a, None);
    match p {
        Ok(p) => println!(
            "nu {:.20e} tau {:.6e} {:.6e}, loop {:?}, {} steps, {:.2?}",
            p.nu.real().to_f64(),
            p.tau.real().to_f64(),
            p.tau.imag().to_f64(),
            p.beta_loop,
            p.beta.steps,
            t.elapsed()
        ),
        Err(e) => println!("{e}"),
    }
}
