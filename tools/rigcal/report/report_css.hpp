#pragma once
// The report page's style sheet (inline in the page): a plain, print-friendly layout of our own.
namespace rigcal::report {

inline constexpr const char* report_css = R"css(
:root { --ink: #1d2730; --muted: #5a6772; --rule: #d5dce2; --accent: #0b6e69; --paper: #ffffff;
        --panel: #f4f7f9; --pass: #1e6b3a; --pass-bg: #e2f1e6; --fail: #8f1d17; --fail-bg: #f8e1df;
        --ind: #7a5300; --ind-bg: #faefd6; }
* { box-sizing: border-box; }
body { margin: 0; background: #e9eef2; color: var(--ink); font: 15px/1.5 sans-serif; }
main { max-width: 960px; margin: 24px auto; background: var(--paper); padding: 28px 32px 36px;
       border: 1px solid var(--rule); }
h1 { font-size: 26px; margin: 0 0 2px; letter-spacing: 0.01em; }
h2 { font-size: 19px; margin: 34px 0 10px; padding: 2px 0 2px 10px; border-left: 5px solid var(--accent); }
h3 { font-size: 16px; margin: 22px 0 6px; }
p { margin: 8px 0; }
.subtitle { color: var(--muted); margin: 0 0 16px; }
dl.identity { display: grid; grid-template-columns: 200px 1fr; gap: 3px 16px; margin: 12px 0;
              padding: 12px 16px; background: var(--panel); border: 1px solid var(--rule); }
dl.identity dt { color: var(--muted); }
dl.identity dd { margin: 0; overflow-wrap: anywhere; }
.headline { display: flex; flex-wrap: wrap; gap: 10px; margin: 14px 0 4px; }
.badge { display: inline-block; padding: 5px 12px; border-radius: 4px; font-weight: bold; border: 1px solid; }
.badge.pass { color: var(--pass); background: var(--pass-bg); }
.badge.fail { color: var(--fail); background: var(--fail-bg); }
.badge.indeterminate, .badge.not-judged { color: var(--ind); background: var(--ind-bg); }
table { border-collapse: collapse; margin: 8px 0 12px; width: 100%; font-size: 14px; }
th, td { padding: 4px 8px; border-bottom: 1px solid var(--rule); text-align: left; vertical-align: top; }
th { background: var(--panel); font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.total td { font-weight: bold; border-top: 2px solid var(--ink); }
figure { margin: 14px 0 18px; }
figure svg { display: block; max-width: 100%; height: auto; border: 1px solid var(--rule); }
figcaption { color: var(--muted); font-size: 13.5px; margin-top: 6px; }
.note { color: var(--ind); background: var(--ind-bg); padding: 6px 10px; border-radius: 3px; margin: 6px 0; }
.caution { border: 2px solid var(--fail); padding: 10px 16px 10px 32px; background: #fdf6f5; }
.caution li { margin: 4px 0; }
.statement { padding: 8px 12px; background: var(--panel); border-left: 4px solid var(--muted); }
footer { margin-top: 28px; color: var(--muted); font-size: 12.5px; border-top: 1px solid var(--rule); padding-top: 8px; }
@media print {
  body { background: none; }
  main { margin: 0; border: none; max-width: none; padding: 0; }
  figure, table, .caution { break-inside: avoid; }
  h2 { break-after: avoid; }
}
)css";

}  // namespace rigcal::report
