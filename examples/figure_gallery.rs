//! The audit figures of F0, P2 and dP3 (levels 0..4, the tour's grid and digits) written as SVG,
//! PNG and PDF, for looking at them:
//! `cargo run --release --example figure_gallery -- /tmp/gallery [untitled]`.
use regwave::checks::audit::{self, Audit, AuditOptions};
use regwave::output::figures::{self, FigureFormats, FigureOptions};
use std::path::PathBuf;

fn main() {
    let dir = PathBuf::from(
        std::env::args()
            .nth(1)
            .unwrap_or_else(|| "/tmp/regwave-gallery".into()),
    );
    std::fs::create_dir_all(&dir).expect("output directory");
    let drawing = FigureOptions {
        titles: std::env::args().nth(2).as_deref() != Some("untitled"),
    };
    let options = AuditOptions {
        levels: 0..=4,
        digits: 16,
        grid: regwave::Grid::parse("-12:12:241").expect("grid"),
        perturbation: 1e-6,
        spectrum_basis: 200,
        spectrum_max_basis: 300,
    };
    let families = ["F0", "P2", "dP3"];
    let mut figs = Vec::new();
    let mut audits: Vec<Audit> = Vec::new();
    for id in families {
        let laurent = regwave::family(id).expect("catalogue family");
        let audit = audit::run(&laurent, &options, &regwave::progress::quiet).expect("audit");
        figs.extend(figures::family_figures_with(id, &laurent, &audit, &drawing).expect("figures"));
        audits.push(audit);
    }
    let pairs: Vec<(&str, &Audit)> = families.iter().copied().zip(&audits).collect();
    figs.push(figures::agreement_with(&pairs, &drawing).expect("agreement figure"));
    for (name, bytes) in figures::figure_files_in(
        &figs,
        &FigureFormats {
            png: true,
            pdf: true,
        },
    )
    .expect("files")
    {
        std::fs::write(dir.join(&name), &bytes).expect("write");
        println!("{name:32} {:>8} bytes", bytes.len());
    }
}
