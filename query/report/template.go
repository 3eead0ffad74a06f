package report

import "html/template"

// pageTmpl is the report page. html/template escapes every value by its
// context; only the cleaned SVG (template.HTML) and the font rule
// (template.CSS) are inserted as they are.
var pageTmpl = template.Must(template.New("report").Parse(pageHTML))

const pageHTML = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; font-src data:; img-src data:; base-uri 'none'; form-action 'none'">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="partsieve">
<title>{{.Title}}</title>
<style>
{{.FontCSS}}
:root{--ink:#1b1b1b;--muted:#5a5a5a;--line:#d4d4d4;--band:#f4f5f7;--ok:#2e7d32;--thin:#b07800;--bad:#c62828;--accent:#0b4f8a}
*{box-sizing:border-box}
body{margin:0;font-family:"Liberation Sans",Arial,Helvetica,sans-serif;color:var(--ink);background:#fff;font-size:14px;line-height:1.45}
main{max-width:1260px;margin:0 auto;padding:20px 24px 48px}
h1{font-size:24px;margin:0 0 4px}
h2{font-size:19px;margin:34px 0 10px;padding-bottom:4px;border-bottom:2px solid var(--accent)}
h3{font-size:16px;margin:22px 0 8px}
p{margin:6px 0}
.sub{color:var(--muted)}
table{border-collapse:collapse;width:100%;margin:8px 0 14px}
th,td{border:1px solid var(--line);padding:5px 7px;text-align:left;vertical-align:top}
th{background:var(--band);font-weight:bold;white-space:nowrap}
td.n{white-space:nowrap;font-variant-numeric:tabular-nums}
td.k{white-space:nowrap;font-family:"Liberation Mono",Consolas,monospace;font-size:13px}
tr.unverified td{background:#fff6e0}
.mpn{font-weight:bold;font-family:"Liberation Mono",Consolas,monospace;overflow-wrap:anywhere}
.small{font-size:12.5px;color:var(--muted)}
.badge{display:inline-block;padding:1px 7px;border-radius:9px;font-size:12px;font-weight:bold;color:#fff;white-space:nowrap}
.b-ok{background:var(--ok)}.b-unsafe{background:var(--thin)}.b-none{background:#777}.b-fail{background:var(--bad)}
.fails{color:var(--bad);font-weight:bold}.thin{color:var(--thin);font-weight:bold}
.caution{border:2px solid var(--bad);background:#fdf1f1;padding:10px 14px 10px 14px;margin:14px 0}
.caution h2{border:0;margin:0 0 4px;padding:0;color:var(--bad);font-size:16px}
.caution ul{margin:4px 0;padding-left:20px}
.hazard{color:#8a4b00}
.hazard::before{content:"⚠ "}
.unsafe{border-left:4px solid var(--thin);padding-left:10px}
pre{background:var(--band);border:1px solid var(--line);padding:10px;overflow:auto;font-size:12.5px;max-height:520px;white-space:pre-wrap;overflow-wrap:anywhere}
.grid{display:grid;grid-template-columns:1fr 1fr;gap:18px;align-items:start}
.grid>figure.wide{grid-column:1/-1}
figure{margin:0;border:1px solid var(--line);padding:10px;background:#fff;break-inside:avoid}
figcaption{font-size:12.5px;color:var(--muted);margin-top:4px}
figure .ft{font-weight:bold;font-size:14px;margin-bottom:4px;overflow-wrap:anywhere}
svg.plot{display:block;width:100%;height:auto}
figure.wide svg.plot{max-width:860px}
details{margin:8px 0}
summary{cursor:pointer;font-weight:bold}
ul.flat{margin:4px 0;padding-left:20px}
.cols{display:grid;grid-template-columns:1fr 1fr;gap:18px}
@media (max-width:1000px){.grid,.cols{grid-template-columns:1fr}}
@media print{main{max-width:none}pre{max-height:none}h2{break-after:avoid}}
</style>
</head>
<body>
<main>
<header>
<h1>{{.Title}}</h1>
<p class="sub">Policy <b>{{.PolicyName}}</b>, ranked by {{.Rank}}, top {{.Top}} per topology, {{.Quantity}} boards, prices in {{.Currency}}{{if .Generated}}; generated {{.Generated}}{{end}} by partsieve.</p>
</header>

<section class="caution" id="cautions">
<h2>Cautions</h2>
<ul>{{range .Cautions}}<li>{{.}}</li>{{end}}</ul>
</section>

<section id="comparison">
<h2>Best design of each topology</h2>
<table>
<thead><tr><th>Topology</th><th>Status</th><th>Parts</th><th>Loss</th><th>Drop</th><th>Unit cost</th><th>Smallest margin</th><th>Hazards</th></tr></thead>
<tbody>
{{range .Comparison}}<tr>
<td class="k"><a href="#t-{{.Topology}}">{{.Topology}}</a></td>
<td><span class="badge b-{{.Status}}">{{.Status}}</span></td>
<td class="mpn">{{.Parts}}</td>
<td class="n">{{.Loss}}</td><td class="n">{{.Drop}}</td><td class="n">{{.Cost}}</td><td class="n">{{.Margin}}</td>
<td>{{range .Hazards}}<div class="hazard">{{.}}</div>{{end}}</td>
</tr>
{{end}}</tbody>
</table>
{{if .Notes}}<p><b>Notes</b></p><ul class="flat">{{range .Notes}}<li>{{.}}</li>{{end}}</ul>{{end}}
</section>

<section id="spec">
<h2>Application spec</h2>
<p>File <span class="k">{{.SpecFile}}</span>. Hot corner: {{.HotCorner}}. Cold corner: {{.ColdCorner}}.</p>
<div class="cols">
<div>
<table>
<thead><tr><th>Table</th><th>Key</th><th>Value</th><th>Meaning</th></tr></thead>
<tbody>
{{range .SpecRows}}<tr><td>{{.Group}}</td><td class="k">{{.Key}}</td><td class="n">{{.Value}}</td><td class="small">{{.Note}}</td></tr>
{{end}}</tbody>
</table>
{{if .SpecNotes}}<p><b>Spec notes</b></p><ul class="flat">{{range .SpecNotes}}<li>{{.}}</li>{{end}}</ul>{{end}}
</div>
<div>
<p><b>The spec as written</b></p>
<pre>{{.SpecText}}</pre>
</div>
</div>
</section>

<section id="policy">
<h2>Derating policy: {{.PolicyName}}</h2>
<p>{{.PolicyDesc}}.{{if .Overrides}} Overrides in the spec: {{range $i, $o := .Overrides}}{{if $i}}, {{end}}<span class="k">{{$o}}</span>{{end}}.{{end}}
{{if .Unverified}} <span class="thin">{{.Unverified}} factors are unverified defaults [M]</span>: replace them with the figures of the standard you hold.{{end}}</p>
<table>
<thead><tr><th>Factor</th><th>What it limits</th><th>Value</th><th>Confidence</th><th>Source</th></tr></thead>
<tbody>
{{range .Factors}}<tr{{if .Unverified}} class="unverified"{{end}}><td class="k">{{.Name}}</td><td>{{.Label}}</td><td class="n">{{.Value}}</td><td class="n">{{.Tag}} {{.Confidence}}</td><td class="small">{{.Source}}</td></tr>
{{end}}</tbody>
</table>
</section>

{{range .Topologies}}
<section id="{{.ID}}"{{if .Unsafe}} class="unsafe"{{end}}>
<h2>{{.Name}}: {{.Title}} <span class="badge b-{{.Status}}">{{.Status}}</span></h2>
<p>{{.Qualified}} designs qualify; parts evaluated: {{.Evaluated}}.</p>
{{if .Unsafe}}<p class="fails">Ranked out: {{.UnsafeReason}}</p>{{end}}
{{range .Hazards}}<div class="hazard">{{.}}</div>{{end}}
{{if .Candidates}}
{{if .RankedOut}}<p><b>Best designs, shown for comparison only:</b></p>{{end}}
<table>
<thead><tr><th>#</th><th>Design</th><th>Loss</th><th>T<sub>j</sub> hot</th><th>Drop</th><th>Smallest margin</th><th>Unit cost</th><th>Stock</th></tr></thead>
<tbody>
{{range .Candidates}}<tr>
<td class="n">{{.Rank}}</td>
<td>{{range .Parts}}<div><span class="small">{{.Role}}</span> <span class="mpn">{{.MPN}}</span> {{.Mfr}}{{if .Package}}, {{.Package}}{{end}}{{if .Type}} <span class="small">({{.Type}})</span>{{end}}
{{if .Desc}}<div class="small">{{.Desc}}</div>{{end}}
<div class="small">{{.Price}}{{if .Supplier}} from {{.Supplier}}{{end}}, {{.Stock}}{{if .PriceNote}}; {{.PriceNote}}{{end}}{{if .Datasheet}}; datasheet: <span class="k">{{.Datasheet}}</span>{{end}}</div></div>{{end}}
{{if .GateResistor}}<div class="small">{{.GateResistor}}</div>{{end}}
{{if .Fault}}<div class="small">{{.Fault}}</div>{{end}}
{{range .Hazards}}<div class="hazard small">{{.}}</div>{{end}}
</td>
<td class="n">{{.Loss}}</td><td class="n">{{.Tj}}</td><td class="n">{{.Drop}}</td>
<td><span class="n{{if .MarginFails}} fails{{else if .MarginThin}} thin{{end}}">{{.Margin}}</span><div class="small">{{.MarginCheck}}</div></td>
<td class="n">{{.Cost}}</td><td class="n">{{.Stock}}</td>
</tr>
{{end}}</tbody>
</table>
{{else}}
<p class="fails">None: {{.NoneReason}}</p>
{{end}}
{{if .Eliminated}}<details><summary>Parts eliminated, by the first check they failed</summary><ul class="flat">{{range .Eliminated}}<li>{{.}}</li>{{end}}</ul></details>{{end}}
{{range .Notes}}<p class="small">Note: {{.}}</p>{{end}}
{{if .Figures}}
<div class="grid">
{{range .Figures}}<figure{{if .Wide}} class="wide"{{end}}>
<div class="ft">{{.Title}}</div>
{{.SVG}}
<figcaption>{{.Caption}}</figcaption>
</figure>
{{end}}</div>
{{end}}
{{if .PlotNotes}}<ul class="flat small">{{range .PlotNotes}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{with .Best}}
<details><summary>Every check of design #{{.Rank}}</summary>
<table>
<thead><tr><th>Check</th><th>Corner</th><th>Value</th><th>Limit</th><th>Margin</th><th>Result</th><th>Formula</th><th>Source and note</th></tr></thead>
<tbody>
{{range .Checks}}<tr><td>{{.Role}}: {{.Name}}</td><td>{{.Corner}}</td><td class="n">{{.Value}}</td><td class="n">{{.Limit}}</td><td class="n">{{.Margin}}</td>
<td>{{if .Pass}}<span class="badge b-ok">ok</span>{{else}}<span class="badge b-fail">fails</span>{{end}}</td>
<td class="small">{{.Formula}}</td><td class="small">{{.Source}}{{if .Note}}<br>{{.Note}}{{end}}</td></tr>
{{end}}</tbody>
</table>
</details>
{{end}}
</section>
{{end}}

<footer>
<p class="small">Made by partsieve from the local catalog. Every figure comes from the models and derating policy above; the plot text uses the Liberation Sans font (SIL Open Font License), embedded in this file.</p>
</footer>
</main>
</body>
</html>
`
