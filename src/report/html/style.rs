//! The page's style sheet: the safety colours from the shared palette, a single column that
//! reflows to a phone's width, and a print layout without the navigation and the buttons.

use crate::assess::Decision;
use crate::caution::Level;
use crate::report::colour::{self, hex};

/// The rules every page carries, inline so that a page is one request.
const BASE: &str = r#"
*{box-sizing:border-box}
body{margin:0;font:16px/1.45 system-ui,-apple-system,"Segoe UI",Roboto,Helvetica,Arial,sans-serif;color:#111;background:#fff}
main{max-width:60rem;margin:0 auto;padding:0 1rem 2rem}
header.site{background:#1f2a36;padding:.5rem 1rem}
header.site a{color:#fff;margin-right:1.2rem;text-decoration:none;font-weight:600}
header.site a:focus,header.site a:hover{text-decoration:underline}
footer.site{max-width:60rem;margin:0 auto;padding:1rem;color:#444;font-size:.85rem;border-top:1px solid #ccc}
h1{font-size:1.5rem;margin:1rem 0 .25rem}
h2{font-size:1.15rem;margin:1.5rem 0 .5rem;border-bottom:1px solid #bbb}
.subtitle{margin:0 0 1rem;color:#333}
.decision{padding:.75rem 1rem;font-size:1.1rem;margin:.5rem 0}
.decision .word{font-size:1.6rem;font-weight:700;margin-right:.5rem}
ul.findings{list-style:none;padding:0;margin:0}
ul.findings li{padding:.5rem 0;border-bottom:1px solid #ddd}
.status{display:inline-block;min-width:4.5rem;text-align:center;font-weight:700;padding:0 .4rem;border:1px solid #555}
.status.ok{background:#fff;color:#111}
.banner{display:flex;gap:.75rem;align-items:flex-start;border:1px solid #555;margin:.5rem 0;padding:.5rem .75rem;background:#f6f6f6;color:#111}
.banner .signal{flex:none;font-weight:700;padding:.1rem .5rem;min-width:6rem;text-align:center}
.banner p{margin:0}
table.entries{border-collapse:collapse;width:100%}
table.entries th,table.entries td{text-align:left;vertical-align:top;padding:.3rem .5rem .3rem 0;border-bottom:1px solid #e2e2e2}
table.entries th{font-weight:400;width:45%}
.value{font-weight:600}
.method{color:#444;font-size:.85rem}
dl dt{font-weight:600;margin-top:.5rem}
dl dd{margin:0 0 0 1rem}
figure.plot{margin:1rem 0;border:1px solid #777;padding:.5rem}
figure.plot>svg{width:100%;height:auto;display:block}
ul.legend svg{display:inline-block;vertical-align:middle}
figcaption{font-weight:600}
form .field{margin:.75rem 0;display:grid;grid-template-columns:minmax(10rem,16rem) 1fr;gap:.25rem .75rem;align-items:start}
form label{font-weight:600}
form .control{display:flex;flex-wrap:wrap;gap:.4rem}
form input[type=text],form input[type=number],form select{font:inherit;padding:.35rem;border:1px solid #555;border-radius:3px;min-width:0}
form input[type=text]{width:100%}
form input.number{width:9rem}
form .hint{grid-column:2;color:#444;font-size:.85rem;margin:0}
form .error{grid-column:2;color:#a00d25;font-weight:600;margin:0}
form .field.refused input,form .field.refused select{border:2px solid #a00d25}
fieldset{border:1px solid #999;margin:1rem 0;padding:.5rem 1rem}
legend{font-weight:700}
button{font:inherit;font-weight:700;padding:.5rem 1.25rem;background:#1f2a36;color:#fff;border:0;border-radius:3px;cursor:pointer}
button:focus{outline:3px solid #ffcd00}
ul.legend{list-style:none;padding:0;margin:.25rem 0 0;display:flex;flex-wrap:wrap;gap:.25rem 1.25rem;font-size:.9rem}
table.ranked{border-collapse:collapse;width:100%}
table.ranked th,table.ranked td{text-align:left;padding:.35rem .5rem;border-bottom:1px solid #ddd;vertical-align:top}
a{color:#0b4f8a}
.refusal{border:2px solid #a00d25;padding:.5rem 1rem;color:#111}
@media (max-width:40rem){
 form .field{grid-template-columns:1fr}
 form .hint,form .error{grid-column:1}
 table.entries th{width:50%}
 .banner{flex-direction:column}
}
@media print{
 header.site,form,button,nav,.no-print{display:none}
 body{font-size:11pt}
 main{max-width:none;padding:0}
 .decision,.banner .signal,.status{-webkit-print-color-adjust:exact;print-color-adjust:exact}
 figure.plot,.banner,ul.findings li{break-inside:avoid}
}
"#;

/// The style sheet: the base rules and one class per signal word and decision, in the same
/// colours as the printed worksheet.
pub(super) fn css() -> String {
    let mut out = String::from(BASE);
    for (class, level) in [
        ("danger", Level::Danger),
        ("warning", Level::Warning),
        ("caution", Level::Caution),
        ("notice", Level::Notice),
    ] {
        let (panel, ink) = colour::signal(level);
        out.push_str(&format!(
            ".banner.{class} .signal,.status.{class}{{background:{};color:{}}}\n",
            hex(panel),
            hex(ink)
        ));
    }
    for (class, decision) in [
        ("no-go", Decision::NoGo),
        ("go-with-actions", Decision::GoWithActions),
        ("go", Decision::Go),
    ] {
        let (band, ink) = colour::decision(decision);
        out.push_str(&format!(
            ".decision.{class}{{background:{};color:{}}}\n",
            hex(band),
            hex(ink)
        ));
    }
    out
}
