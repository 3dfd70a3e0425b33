"""Inline CSS of the report: plain, high-contrast, A4 print-friendly, no web fonts."""

CSS = """
@page { size: A4; margin: 16mm 14mm 18mm; }
* { box-sizing: border-box; }
/* Words wrap at spaces only: no hyphenation, a word is broken only if it cannot fit at all. */
html { hyphens: manual; -webkit-hyphens: manual; word-break: normal; }
body { margin: 0; color: #1b1b1b; background: #fff;
       font: 10.5pt/1.45 "Segoe UI", "Helvetica Neue", Arial, "Liberation Sans", sans-serif; }
main { max-width: 190mm; margin: 0 auto; padding: 8mm 0 12mm; }
header { border-bottom: 2px solid #1b1b1b; margin-bottom: 4mm; }
.kicker { margin: 0; text-transform: uppercase; letter-spacing: .08em; font-size: 8.5pt;
          color: #555; }
h1 { margin: 1mm 0 1mm; font-size: 17pt; line-height: 1.2; overflow-wrap: break-word; }
.meta { margin: 0 0 2mm; font-size: 8.5pt; color: #444; overflow-wrap: break-word; }
h2 { font-size: 12.5pt; margin: 7mm 0 2mm; padding-bottom: .8mm; border-bottom: 1px solid #bbb; }
h3 { font-size: 10.5pt; margin: 4mm 0 1.5mm; }
.caution { border: 2.5px solid #8a1c00; background: #fff4ec; padding: 3mm 4mm; margin: 3mm 0;
           font-size: 10pt; break-inside: avoid; }
.caution-small { font-size: 8pt; color: #444; }
dl { display: grid; grid-template-columns: max-content 1fr; gap: .6mm 5mm; margin: 2mm 0; }
dt { font-weight: 600; }
.title-block { grid-template-columns: max-content 1fr max-content 1fr; border: 1px solid #bbb;
               padding: 2mm 3mm; }
.title-block dd.blank { border-bottom: 1px solid #777; min-width: 35mm; }
dd { margin: 0; overflow-wrap: break-word; }
table { border-collapse: collapse; width: 100%; margin: 2mm 0 4mm; font-size: 9pt;
        break-inside: avoid; }
caption { text-align: left; font-weight: 600; padding: 1mm 0; }
th, td { border: 1px solid #c8c8c8; padding: .9mm 1.6mm; vertical-align: top; text-align: left;
         overflow-wrap: break-word; }
th { background: #f0f0f0; }
td.num { text-align: right; white-space: nowrap; font-variant-numeric: tabular-nums; }
figure { margin: 2mm 0; break-inside: avoid; }
figure img { display: block; width: 100%; max-height: 235mm; object-fit: contain; }
.badge { display: inline-block; padding: 0 2mm; border-radius: 1mm; font-weight: 700;
         letter-spacing: .05em; }
.badge.pass { background: #d9efdc; color: #0b4a16; border: 1px solid #0b4a16; }
.badge.fail { background: #fbdcd8; color: #7d1106; border: 1px solid #7d1106; }
.note { font-size: 8.5pt; color: #444; }
footer { margin-top: 8mm; border-top: 1px solid #bbb; font-size: 8.5pt; color: #333; }
section { break-inside: auto; }
h2, h3, caption { break-after: avoid; }
@media print { main { padding: 0; max-width: none; } a { color: inherit; } }
"""
