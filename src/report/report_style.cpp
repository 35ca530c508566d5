// The report's style sheet (screen and print), embedded in the page's <head>.
#include "report_internal.h"

namespace pkarta {
namespace report_internal {

const char* const kReportCss = R"css(
:root { --ink: #1a1a1a; --muted: #555; --rule: #c8c8c8; --accent: #0072b2; --warn-bg: #fff4cc; --warn-ink: #5c4400; }
* { box-sizing: border-box; }
html { background: #f3f3f1; }
body { margin: 0 auto; max-width: 1000px; padding: 0 28px 40px; background: #ffffff; color: var(--ink);
       font-family: sans-serif; font-size: 15px; line-height: 1.45; }
header.report-head { border-bottom: 4px solid var(--accent); padding: 26px 0 14px; }
header.report-head h1 { font-size: 27px; margin: 0 0 4px; }
header.report-head p { margin: 0; color: var(--muted); }
h2 { font-size: 20px; margin: 34px 0 10px; padding-bottom: 4px; border-bottom: 1px solid var(--rule); }
h2 .num { color: var(--accent); margin-right: 8px; }
h3 { font-size: 16px; margin: 20px 0 6px; }
section { break-inside: auto; }
.key-numbers { display: grid; grid-template-columns: repeat(3, 1fr); gap: 12px; margin: 18px 0 8px; }
.key { border: 1px solid var(--rule); border-top: 5px solid var(--accent); padding: 10px 12px 12px; border-radius: 3px; }
.key.lead { border-top-color: #d55e00; }
.key .label { font-size: 13px; letter-spacing: 0.02em; color: var(--muted); font-weight: bold; }
.key .value { font-size: 23px; font-weight: bold; margin: 2px 0; }
.key .detail { font-size: 13px; color: var(--ink); }
.key .where { font-size: 12px; color: var(--muted); margin-top: 4px; }
.caution { display: flex; gap: 14px; align-items: flex-start; background: var(--warn-bg); color: var(--warn-ink);
           border: 2px solid #8a6d00; border-radius: 4px; padding: 12px 16px; margin: 16px 0; }
.caution .sign { flex: 0 0 34px; height: 34px; border-radius: 50%; background: #8a6d00; color: #ffffff;
                 font-weight: bold; font-size: 22px; text-align: center; line-height: 34px; }
.caution p { margin: 0; }
.caution strong { color: #3d2d00; }
nav.contents { font-size: 14px; margin: 10px 0; }
nav.contents ol { margin: 4px 0; padding-left: 22px; columns: 2; }
figure { margin: 14px 0 18px; break-inside: avoid; }
figure svg { width: 100%; height: auto; display: block; }
figcaption { font-size: 13.5px; color: var(--muted); margin-top: 4px; }
figcaption strong { color: var(--ink); }
.table-wrap { overflow-x: auto; margin: 10px 0 16px; }
table { border-collapse: collapse; font-size: 13.5px; min-width: 50%; }
caption { text-align: left; font-weight: bold; padding: 4px 0 6px; caption-side: top; }
caption .csv-link { font-weight: normal; font-size: 12px; margin-left: 8px; }
caption .note { display: block; font-weight: normal; font-size: 12.5px; color: var(--muted); }
th, td { padding: 4px 10px; border-bottom: 1px solid #e2e2e2; text-align: left; vertical-align: top; }
thead th { border-bottom: 2px solid var(--ink); background: #f4f6f8; }
tbody tr:nth-child(even) { background: #fafafa; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.lead th, tr.lead td { background: #fde9dc; font-weight: bold; }
.muted { color: var(--muted); }
.absent { border: 1px dashed var(--rule); padding: 8px 12px; color: var(--muted); font-size: 14px; }
ul.warnings li { color: #7a3a00; }
ol.refs li { margin-bottom: 3px; }
dl.trace { display: grid; grid-template-columns: max-content 1fr; gap: 3px 16px; font-size: 13.5px; }
dl.trace dt { font-weight: bold; }
dl.trace dd { margin: 0; }
code, .hash { font-family: monospace; font-size: 12.5px; overflow-wrap: anywhere; }
.hash { word-break: break-all; }
footer { margin-top: 36px; border-top: 1px solid var(--rule); padding-top: 8px; font-size: 12.5px; color: var(--muted); }
@media (max-width: 760px) { .key-numbers { grid-template-columns: 1fr; } nav.contents ol { columns: 1; } }
@media print {
  @page { size: A4; margin: 14mm 14mm 16mm; }
  html, body { background: #ffffff; }
  body { max-width: none; padding: 0; font-size: 10pt; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  nav.contents, .csv-link { display: none; }
  h2 { break-after: avoid; }
  figure, .key-numbers, .caution, table { break-inside: avoid; }
  .table-wrap { overflow: visible; }
  .key-numbers { grid-template-columns: repeat(3, 1fr); }
}
)css";

}  // namespace report_internal
}  // namespace pkarta
