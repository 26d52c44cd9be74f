using System.Net;
using System.Text;
using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.Reports;

/// <summary>
/// <c>report.html</c>: one self-contained page (inline CSS, JS and SVG; nothing fetched) with a summary of verdicts, the
/// terms ranked by ambiguity, a sheet per term (bar chart of sense weights, each sense's atoms, label, neighbours, cues
/// and examples), an atom index and a search box. Every piece of input text is HTML-escaped.
/// </summary>
public static class HtmlReport
{
    public static string E(string s) => WebUtility.HtmlEncode(s);

    public static void Write(AuditReport report, TextWriter w)
    {
        var model = report.Model;
        var results = report.Results;
        var ranked = report.Ranked();
        var counts = new Dictionary<Verdict, int>();
        foreach (var r in results) counts[r.Verdict] = counts.GetValueOrDefault(r.Verdict) + 1;

        w.Write("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">");
        w.Write("<title>SenseSplit audit</title><style>");
        w.Write(Css);
        w.Write("</style></head><body>\n");
        w.Write("<header class=\"top\"><div class=\"wrap\"><h1>Sense audit</h1><p class=\"sub\">");
        w.Write(E($"{results.Count} terms · {model.Vectors.Count} words · {model.AtomCount} atoms · {model.Dimensions} dimensions · at most {model.Codes.Sparsity} atoms per word"));
        if (report.Manifest.VectorsFile.Length > 0) w.Write(" · vectors " + E(report.Manifest.VectorsFile));
        if (report.Corpus is not null) w.Write(E($" · corpus: {report.Corpus.Count} file(s)"));
        w.Write("</p><nav><a href=\"#summary\">Summary</a><a href=\"#terms\">Terms</a><a href=\"#sheets\">Term sheets</a><a href=\"#atoms\">Atom index</a></nav></div></header>\n<main class=\"wrap\">\n");

        // Summary: counts per verdict (clickable filters) and the search box.
        w.Write("<section id=\"summary\"><h2>Summary</h2><div class=\"tiles\">");
        foreach (var v in new[] { Verdict.Several, Verdict.Doubtful, Verdict.Single, Verdict.Unknown })
        {
            string name = VerdictNames.Of(v);
            w.Write($"<button type=\"button\" class=\"tile v-{name}\" data-verdict=\"{name}\"><span class=\"num\" data-count=\"{name}\">{Fmt.I(counts.GetValueOrDefault(v))}</span><span class=\"lbl\">{E(Describe(v))}</span></button>");
        }
        w.Write("</div><div class=\"searchbar\"><label for=\"q\">Find a term or word</label><input id=\"q\" type=\"search\" placeholder=\"type to filter terms, label words, neighbours…\" autocomplete=\"off\">");
        w.Write("<span id=\"shown\" aria-live=\"polite\"></span><button type=\"button\" id=\"clear\">Show all</button></div>");
        int generic = model.Catalog.Flags.Count(f => (f & AtomFlags.Generic) != 0), diffuse = model.Catalog.Flags.Count(f => (f & AtomFlags.Diffuse) != 0);
        w.Write($"<p class=\"note\">Atoms flagged generic: {Fmt.I(generic)} · diffuse: {Fmt.I(diffuse)} of {Fmt.I(model.AtomCount)}. A sense resting only on diffuse atoms is marked doubtful, not hidden.</p></section>\n");

        // Terms ranked by ambiguity.
        w.Write("<section id=\"terms\"><h2>Terms by ambiguity</h2><table class=\"grid\" id=\"overview\"><thead><tr><th>Term</th><th>Verdict</th><th class=\"r\">Senses</th><th class=\"r\">Ambiguity</th><th class=\"r\" title=\"share of words of about the same frequency that are less mixed\">Peer rank</th><th>Main senses</th></tr></thead><tbody>\n");
        foreach (int t in ranked)
        {
            var r = results[t];
            string verdict = VerdictNames.Of(r.Verdict);
            w.Write($"<tr data-verdict=\"{verdict}\" data-search=\"{E(SearchText(r))}\"><td><a href=\"#t{t}\">{E(r.Query.Term)}</a></td>");
            w.Write($"<td><span class=\"badge v-{verdict}\">{verdict}</span></td><td class=\"r\">{Fmt.I(r.Senses.Count)}</td>");
            w.Write($"<td class=\"r\"><span class=\"amb\"><span style=\"width:{Fmt.N(100 * r.Ambiguity)}%\"></span></span> {Fmt.N(r.Ambiguity)}</td>");
            w.Write($"<td class=\"r\">{(r.PeerRank is double pr ? Fmt.I((long)Math.Round(100 * pr)) + "%" : "")}</td><td class=\"lab\">");
            w.Write(E(string.Join("  /  ", r.Senses.Take(3).Select(s => string.Join(' ', s.Label.Take(4)) + (s.FromCorpus ? " (from corpus)" : "")))));
            if (r.Verdict == Verdict.Unknown && r.CloseSpellings.Count > 0) w.Write(E("close: " + string.Join(", ", r.CloseSpellings)));
            w.Write("</td></tr>\n");
        }
        w.Write("</tbody></table></section>\n");

        // A sheet per term.
        w.Write("<section id=\"sheets\"><h2>Term sheets</h2>\n");
        foreach (int t in ranked) WriteSheet(report, t, w);
        w.Write("</section>\n");

        // Atom index.
        w.Write("<section id=\"atoms\"><h2>Atom index</h2><div class=\"searchbar\"><label for=\"aq\">Filter atoms</label><input id=\"aq\" type=\"search\" placeholder=\"word or atom number\" autocomplete=\"off\"><span id=\"ashown\"></span></div>");
        w.Write("<table class=\"grid\" id=\"atomtable\"><thead><tr><th class=\"r\">Atom</th><th>Label words</th><th class=\"r\">Coherence</th><th class=\"r\">Usage</th><th>Flags</th><th>Glossary terms using it</th></tr></thead><tbody>\n");
        for (int a = 0; a < model.AtomCount; a++)
        {
            string label = report.AtomLabel(a);
            string flags = AuditReport.AtomFlagNames(model.Catalog.Flags[a]);
            var users = report.TermsUsing(a);
            w.Write($"<tr id=\"atom-{a}\" data-search=\"{E(Fmt.I(a) + " " + label + " " + flags)}\"><td class=\"r\">{Fmt.I(a)}</td><td class=\"lab\">{E(label)}</td>");
            w.Write($"<td class=\"r\">{Fmt.N(model.Catalog.Coherence[a])}</td><td class=\"r\">{Fmt.I(model.Catalog.Usage[a])}</td><td>");
            foreach (var f in flags.Split(' ', StringSplitOptions.RemoveEmptyEntries)) w.Write($"<span class=\"flag f-{f}\">{f}</span> ");
            w.Write("</td><td>");
            foreach (int t in users.Take(20)) w.Write($"<a href=\"#t{t}\">{E(results[t].Query.Term)}</a> ");
            if (users.Count > 20) w.Write(E($"and {users.Count - 20} more"));
            w.Write("</td></tr>\n");
        }
        w.Write("</tbody></table></section>\n</main>\n<footer class=\"wrap\"><p>Written by sensesplit audit. Weights are code weights of the term's vector over the atoms; a sense merges the atoms whose discourses read as one. See senses.csv and senses.jsonl for the same numbers.</p></footer>\n");
        w.Write("<script>");
        w.Write(Script);
        w.Write("</script>\n</body></html>\n");
    }

    private static string Describe(Verdict v) => v switch
    {
        Verdict.Several => "several senses",
        Verdict.Doubtful => "doubtful",
        Verdict.Single => "one sense",
        _ => "not in the vocabulary",
    };

    private static string SearchText(TermSenses r)
        => (r.Query.Term + " " + string.Join(' ', r.Senses.SelectMany(s => s.Label.Concat(s.Neighbours)))).ToLowerInvariant();

    private static void WriteSheet(AuditReport report, int t, TextWriter w)
    {
        var r = report.Results[t];
        string verdict = VerdictNames.Of(r.Verdict);
        w.Write($"<article class=\"sheet\" id=\"t{t}\" data-verdict=\"{verdict}\" data-search=\"{E(SearchText(r))}\"><h3>{E(r.Query.Term)} <span class=\"badge v-{verdict}\">{verdict}</span>");
        if (r.Composed) w.Write(" <span class=\"badge plain\">composed</span>");
        w.Write("</h3><p class=\"facts\">");
        var facts = new List<string> { $"ambiguity {Fmt.N(r.Ambiguity)}", $"{r.Senses.Count} sense(s)" };
        if (r.PeerRank is double pr) facts.Add($"more mixed than {Fmt.I((long)Math.Round(100 * pr))}% of {(r.Count is null ? "the sampled words" : "words of its frequency")}");
        if (r.Count is long c) facts.Add($"{Fmt.I(c)} occurrences in the training corpus");
        if (report.Corpus is not null && r.Verdict != Verdict.Unknown) facts.Add($"{Fmt.I(r.Occurrences)} in the audit corpus");
        if (r.Dropped.Count > 0) facts.Add("left out: " + string.Join(", ", r.Dropped.Select(d => $"atom {d.Atom} ({d.Reason})")));
        w.Write(E(string.Join(" · ", facts)));
        w.Write("</p>");
        var notes = r.Notes.Concat(r.CorpusNotes).ToList();
        if (r.Verdict == Verdict.Unknown && r.CloseSpellings.Count > 0) notes.Add("close spellings in the vocabulary: " + string.Join(", ", r.CloseSpellings));
        if (notes.Count > 0) w.Write("<ul class=\"notes\">" + string.Concat(notes.Select(n => $"<li>{E(n)}</li>")) + "</ul>");
        if (r.Senses.Count > 0)
        {
            WriteBars(r, t, w);
            w.Write("<div class=\"senses\">");
            foreach (var s in r.Senses)
            {
                w.Write($"<div class=\"sense{(s.Doubtful ? " doubt" : "")}\"><h4>Sense {Fmt.I(s.Id)} <span class=\"wt\">weight <b data-weight=\"{t}:{s.Id}\">{Fmt.N(s.Weight)}</b> · share {Fmt.N(s.Share)}</span></h4>");
                if (s.Doubtful) w.Write($"<p class=\"why\">doubtful: {E(s.Reason)}</p>");
                if (s.FromCorpus) w.Write("<p class=\"why\">found in the corpus: the term's contexts point to this atom, its vector does not carry it</p>");
                w.Write("<dl><dt>Atoms</dt><dd>" + string.Join(" ", s.Atoms.Select((a, i) => $"<a href=\"#atom-{a}\">{Fmt.I(a)}</a> <small>({Fmt.N(s.AtomWeights[i])})</small>")) + "</dd>");
                w.Write($"<dt>Label</dt><dd>{E(string.Join(", ", s.Label))}</dd>");
                w.Write($"<dt>Neighbours</dt><dd>{E(string.Join(", ", s.Neighbours))}</dd>");
                w.Write($"<dt>Cues</dt><dd>{E(string.Join(", ", s.Cues))}</dd>");
                if (report.Corpus is not null) w.Write($"<dt>In the corpus</dt><dd>{Fmt.I(s.Occurrences)} occurrence(s)</dd>");
                w.Write("</dl>");
                if (s.Examples.Count > 0)
                {
                    w.Write("<ol class=\"ex\">");
                    foreach (var e in s.Examples)
                    {
                        string where = report.Corpus is null ? "" : $"{report.Corpus[e.Document].Source}:{report.Corpus[e.Document].LineOf(e.CharIndex)}";
                        w.Write($"<li>{E(e.Context)} <small>{E(where)} · confidence {Fmt.N(e.Confidence)}</small></li>");
                    }
                    w.Write("</ol>");
                }
                w.Write("</div>");
            }
            w.Write("</div>");
        }
        w.Write("</article>\n");
    }

    /// <summary>Horizontal bars, one per sense, length proportional to the weight (largest = full width).</summary>
    private static void WriteBars(TermSenses r, int t, TextWriter w)
    {
        const int rowH = 26, labelW = 90, barW = 420, valueW = 60;
        double max = Math.Max(1e-9, r.Senses.Max(s => s.Weight));
        int h = rowH * r.Senses.Count + 4;
        var sb = new StringBuilder();
        sb.Append($"<svg class=\"bars\" role=\"img\" aria-label=\"sense weights of {E(r.Query.Term)}\" width=\"{labelW + barW + valueW}\" height=\"{h}\" viewBox=\"0 0 {labelW + barW + valueW} {h}\">");
        for (int i = 0; i < r.Senses.Count; i++)
        {
            var s = r.Senses[i];
            int y = 2 + i * rowH;
            double len = Math.Max(2, barW * Math.Max(0, s.Weight) / max);
            sb.Append($"<text x=\"0\" y=\"{y + 17}\" class=\"bl\">sense {Fmt.I(s.Id)}</text>");
            sb.Append($"<rect x=\"{labelW}\" y=\"{y + 4}\" width=\"{Fmt.N(len)}\" height=\"{rowH - 8}\" rx=\"3\" class=\"{(s.Doubtful ? "bd" : "bs")} c{i % 6}\"><title>{E(string.Join(' ', s.Label.Take(5)))}</title></rect>");
            sb.Append($"<text x=\"{Fmt.N(labelW + len + 6)}\" y=\"{y + 17}\" class=\"bv\" data-bar=\"{t}:{s.Id}\">{Fmt.N(s.Weight)}</text>");
        }
        sb.Append("</svg>");
        w.Write(sb.ToString());
    }

    private const string Css = """
:root{--ink:#1d2a33;--muted:#5c6b75;--line:#dde3e7;--paper:#fbfaf7;--card:#ffffff;--accent:#1f6f78;--several:#b4432f;--doubtful:#b8860b;--single:#3c7d4a;--unknown:#6b6f80}
*{box-sizing:border-box}body{margin:0;font:15px/1.5 system-ui,-apple-system,"Segoe UI",Roboto,"Helvetica Neue",Arial,sans-serif;color:var(--ink);background:var(--paper)}
.wrap{max-width:1180px;margin:0 auto;padding:0 24px}
header.top{background:var(--accent);color:#fff;padding:18px 0 10px;margin-bottom:18px}
header.top h1{margin:0;font-size:26px;font-weight:650;letter-spacing:.2px}.sub{margin:4px 0 10px;opacity:.9}
nav a{color:#fff;margin-right:18px;text-decoration:none;border-bottom:2px solid transparent}nav a:hover{border-color:#fff}
h2{font-size:20px;margin:28px 0 10px;padding-bottom:4px;border-bottom:2px solid var(--line)}
.tiles{display:flex;gap:14px;flex-wrap:wrap}
.tile{flex:1 1 180px;background:var(--card);border:1px solid var(--line);border-left:6px solid var(--muted);border-radius:6px;padding:12px 14px;text-align:left;cursor:pointer;font:inherit;color:inherit}
.tile .num{display:block;font-size:30px;font-weight:700}.tile .lbl{color:var(--muted)}.tile.on{outline:3px solid var(--accent)}
.tile.v-several{border-left-color:var(--several)}.tile.v-doubtful{border-left-color:var(--doubtful)}.tile.v-single{border-left-color:var(--single)}.tile.v-unknown{border-left-color:var(--unknown)}
.searchbar{display:flex;align-items:center;gap:10px;margin:16px 0 6px;flex-wrap:wrap}.searchbar label{font-weight:600}
.searchbar input{flex:1 1 320px;padding:8px 10px;border:1px solid #b9c3c9;border-radius:5px;font:inherit}
#shown,#ashown{color:var(--muted)}#clear{font:inherit;padding:6px 10px;border:1px solid var(--line);background:#fff;border-radius:5px;cursor:pointer}
.note{color:var(--muted);font-size:13px}
table.grid{width:100%;border-collapse:collapse;background:var(--card);border:1px solid var(--line)}
.grid th,.grid td{padding:6px 9px;border-bottom:1px solid var(--line);vertical-align:top;text-align:left}
.grid th{background:#eef2f4;font-weight:600;position:sticky;top:0}.grid .r{text-align:right;white-space:nowrap}.lab{color:#33434d}
.badge{display:inline-block;padding:1px 8px;border-radius:10px;font-size:12px;font-weight:600;color:#fff;background:var(--muted);vertical-align:middle}
.badge.v-several{background:var(--several)}.badge.v-doubtful{background:var(--doubtful)}.badge.v-single{background:var(--single)}.badge.v-unknown{background:var(--unknown)}.badge.plain{background:#8a99a3}
.amb{display:inline-block;width:60px;height:8px;background:#e7ecef;border-radius:4px;vertical-align:middle;overflow:hidden}.amb span{display:block;height:100%;background:var(--accent)}
.sheet{background:var(--card);border:1px solid var(--line);border-radius:6px;padding:12px 16px;margin:0 0 14px}
.sheet h3{margin:0 0 4px;font-size:18px}.facts{margin:0 0 8px;color:var(--muted);font-size:13px}
.notes{margin:4px 0 8px;padding-left:18px;color:#6a4d12;font-size:13px}
svg.bars{display:block;margin:6px 0 10px;max-width:100%}svg .bl{font-size:12px;fill:var(--muted)}svg .bv{font-size:12px;fill:var(--ink)}
.bs.c0{fill:#1f6f78}.bs.c1{fill:#c0693f}.bs.c2{fill:#6d5fa6}.bs.c3{fill:#4f8a3a}.bs.c4{fill:#a14d75}.bs.c5{fill:#4a6fa5}.bd{fill:#d9c27a}
.senses{display:grid;grid-template-columns:repeat(auto-fill,minmax(330px,1fr));gap:12px}
.sense{border:1px solid var(--line);border-radius:5px;padding:8px 12px;background:#fcfdfd}.sense.doubt{background:#fffaf0;border-color:#ecd9a4}
.sense h4{margin:0 0 4px;font-size:15px}.wt{font-weight:400;color:var(--muted);font-size:13px}.why{margin:0 0 4px;color:#8a6410;font-size:13px}
dl{margin:0;display:grid;grid-template-columns:90px 1fr;gap:2px 8px;font-size:13.5px}dt{color:var(--muted)}dd{margin:0}
ol.ex{margin:6px 0 0;padding-left:20px;font-size:13px}ol.ex small{color:var(--muted)}
a{color:var(--accent)}footer{color:var(--muted);font-size:12.5px;margin:30px auto 40px}[hidden]{display:none!important}
""";

    private const string Script = """
(function(){
  var q=document.getElementById('q'),shown=document.getElementById('shown'),clear=document.getElementById('clear');
  var rows=Array.prototype.slice.call(document.querySelectorAll('#overview tbody tr'));
  var sheets=Array.prototype.slice.call(document.querySelectorAll('article.sheet'));
  var tiles=Array.prototype.slice.call(document.querySelectorAll('.tile'));
  var verdict='';
  function match(el,text){return (!verdict||el.getAttribute('data-verdict')===verdict)&&(!text||el.getAttribute('data-search').indexOf(text)>=0);}
  function apply(){
    var text=q.value.trim().toLowerCase(),n=0;
    rows.forEach(function(r){var ok=match(r,text);r.hidden=!ok;if(ok)n++;});
    sheets.forEach(function(s){s.hidden=!match(s,text);});
    tiles.forEach(function(t){t.classList.toggle('on',t.getAttribute('data-verdict')===verdict);});
    shown.textContent=n+' of '+rows.length+' terms shown'+(verdict?' ('+verdict+')':'');
  }
  tiles.forEach(function(t){t.addEventListener('click',function(){var v=t.getAttribute('data-verdict');verdict=(verdict===v?'':v);apply();});});
  q.addEventListener('input',apply);
  clear.addEventListener('click',function(){q.value='';verdict='';apply();});
  var aq=document.getElementById('aq'),ashown=document.getElementById('ashown');
  var arows=Array.prototype.slice.call(document.querySelectorAll('#atomtable tbody tr'));
  function applyAtoms(){var t=aq.value.trim().toLowerCase(),n=0;arows.forEach(function(r){var ok=!t||r.getAttribute('data-search').toLowerCase().indexOf(t)>=0;r.hidden=!ok;if(ok)n++;});ashown.textContent=n+' of '+arows.length+' atoms';}
  aq.addEventListener('input',applyAtoms);
  apply();applyAtoms();
  document.body.setAttribute('data-ready','yes');
})();
""";
}
