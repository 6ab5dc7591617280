// The HTML report and the terminal summary, built from hand-built results (no solver, no browser).
import { describe, expect, it } from 'vitest';
import { buildReportHtml } from '../reports/html.js';
import { escapeHtml, jsonForScript, plotlyText } from '../reports/escape.js';
import { formatSummary } from '../reports/summary.js';
import { circlePoints, torusGrid } from '../reports/torus.js';
import { optimalityOf } from '../src/model/result.js';
import { hopfResult, torus3Compare } from './reportFixture.js';

// A stand-in for the plotting library: the builder must inline whatever source it is given.
const FAKE_PLOTLY = 'window.Plotly = { newPlot: function () { return Promise.resolve(); } }; /* </script><!-- */';

describe('torus geometry for the 3D view', () => {
  it('puts every grid point at the tube radius from the core circle', () => {
    // Eberly, "Distance to Circles in 3D": d² = (N·Δ)² + (|Δ − (N·Δ)N| − R)², Δ = P − C.
    const c = [0.3, -1.2, 2], n = [1, 2, -0.5], R = 1.7, r = 0.4;
    const nl = Math.hypot(n[0]!, n[1]!, n[2]!);
    const N = n.map((x) => x / nl);
    const g = torusGrid(c, n, R, r, 30, 12);
    for (let a = 0; a < g.x.length; a++) {
      for (let b = 0; b < g.x[a]!.length; b++) {
        const D = [g.x[a]![b]! - c[0]!, g.y[a]![b]! - c[1]!, g.z[a]![b]! - c[2]!];
        const h = D[0]! * N[0]! + D[1]! * N[1]! + D[2]! * N[2]!;
        const inPlane = Math.hypot(D[0]! - h * N[0]!, D[1]! - h * N[1]!, D[2]! - h * N[2]!);
        expect(Math.hypot(h, inPlane - R)).toBeCloseTo(r, 12);
      }
    }
    // closed surface: the last row repeats the first
    expect(g.x[30]![0]).toBeCloseTo(g.x[0]![0]!, 12);
  });

  it('draws the core circle at distance R from the centre, in the plane normal to n', () => {
    const c = [1, 2, 3], n = [0, 0, 2], R = 2.5;
    const p = circlePoints(c, n, R, 16);
    for (let i = 0; i < p.x.length; i++) {
      expect(Math.hypot(p.x[i]! - 1, p.y[i]! - 2, p.z[i]! - 3)).toBeCloseTo(R, 12);
      expect(p.z[i]).toBeCloseTo(3, 12);
    }
  });
});

describe('escaping', () => {
  // WHATWG HTML Living Standard, "script data state": a script element ends at the first "</script".
  it('never lets data or library text close a script element', () => {
    const s = jsonForScript({ name: '</script><script>alert(1)</script>', n: NaN });
    expect(s).not.toMatch(/<\/script/i);
    expect(JSON.parse(s)).toEqual({ name: '</script><script>alert(1)</script>', n: null });
  });

  it('escapes the five HTML-special characters, and numeric entities for plotly labels', () => {
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;');
    expect(plotlyText('<b>"A"</b>')).toBe('&#60;b&#62;&#34;A&#34;&#60;/b&#62;');
  });
});

describe('HTML report', () => {
  const compare = torus3Compare();
  const built = buildReportHtml(compare, { plotlySource: FAKE_PLOTLY });
  const html = built.html;

  it('is one file with no external resource: no src/href to a URL, no link or iframe elements', () => {
    expect(html).not.toMatch(/<script[^>]*\ssrc=/i);
    expect(html).not.toMatch(/<link\b/i);
    expect(html).not.toMatch(/<iframe\b/i);
    expect(html).not.toMatch(/(src|href)\s*=\s*["']?(https?:)?\/\//i);
    expect(html).toContain('connect-src &#39;none&#39;'); // CSP attribute, entity-escaped
  });

  it('keeps the script structure intact: library, plot data and boot script only', () => {
    // Three opening tags and three closing tags; the library's own "</script" was neutralised.
    expect(html.match(/<script\b/gi)).toHaveLength(3);
    expect(html.match(/<\/script>/gi)).toHaveLength(3);
    expect(html).toContain('window.Plotly = { newPlot');
  });

  it('shows a ring name with markup as text only', () => {
    expect(html).not.toContain('<img src=x');
    expect(html).toContain('&lt;img src=x onerror=&quot;window.__pwned=1&quot;&gt;');
  });

  it('has every section and plot of the report (figures, 3D views, sweep, search history, contacts, cautions)', () => {
    expect(built.plots).toEqual(['view-symmetric', 'view-broken', 'sweep', 'history', 'spread']);
    for (const s of ['Figures', 'The rings in 3D', 'Breaking the symmetry', 'How the search went', 'Rings and contacts', 'Cautions']) {
      expect(built.sections).toContain(s);
    }
    for (const id of built.plots) expect(html).toContain(`id="${id}"`);
  });

  it('prints each figure with its unit', () => {
    const unitOf = (label: string): string => {
      const row = new RegExp(`<th scope="row">${label.replace(/[()/]/g, '\\$&')}</th>(.*?)</tr>`).exec(html);
      expect(row, label).not.toBeNull();
      const cells = [...row![1]!.matchAll(/<td class="u">(.*?)<\/td>/g)].map((m) => m[1]);
      return cells[cells.length - 1] ?? '';
    };
    expect(unitOf('tube radius r')).toBe('layout units');
    expect(unitOf('tube / smallest core radius')).toBe('dimensionless');
    expect(unitOf('aspect ratio (inner diam. / wire diam.)')).toBe('dimensionless');
    expect(unitOf('packing bound on r')).toBe('layout units');
    expect(unitOf('certificate balance residual')).toBe('dimensionless');
  });

  it('is byte-reproducible when no date is given', () => {
    expect(buildReportHtml(torus3Compare(), { plotlySource: FAKE_PLOTLY }).html).toBe(html);
  });

  it('draws an inflate result with one 3D view and no curve', () => {
    const b = buildReportHtml(hopfResult(), { plotlySource: FAKE_PLOTLY });
    expect(b.plots).toEqual(['view', 'history', 'spread']);
    expect(b.sections).not.toContain('Breaking the symmetry');
    expect(b.html).toContain('mm');
  });
});

describe('terminal summary', () => {
  it('states the gain of a compare result in layout units and per cent', () => {
    const c = torus3Compare();
    const text = formatSummary(c);
    // The fixture's tubes are measured by brute-force sampling; the gain is their difference.
    const gain = c.broken.tube - c.symmetric.tube;
    const pct = (100 * gain) / c.symmetric.tube;
    expect(text).toContain(`gain from breaking the symmetry: +${Number(gain.toPrecision(4))} layout units (+${Number(pct.toPrecision(3))} %)`);
    expect(text).toMatch(/tube radius r\s+[\d.]+\s+[\d.]+\s+layout units/);
  });

  it('gives the tight Hopf link tube R/2 in the file\'s units (Cantarella–Kusner–Sullivan 2002)', () => {
    const text = formatSummary(hopfResult());
    expect(text).toMatch(/tube radius r\s+0\.5\s+mm/);
  });
});

describe('what a result may claim about optimality', () => {
  it('global only where the packing bound is attained and the check passed; local for a KKT certificate', () => {
    // The tight Hopf link attains the packing bound R/2 (Cantarella–Kusner–Sullivan 2002), so its optimum is
    // global; a certified result below its bound is only a local optimum; a failed check proves nothing global.
    const hopf = hopfResult();
    expect(optimalityOf(hopf)).toBe('global');
    expect(formatSummary(hopf)).toContain('global optimum (packing bound attained)');
    const below = { ...hopf, bound: { ...hopf.bound!, gap: 0.05 } };
    expect(optimalityOf(below)).toBe('local');
    expect(formatSummary(below)).toContain('certified local optimum');
    expect(optimalityOf({ ...hopf, verification: { ...hopf.verification, ok: false } })).toBe('local');
    expect(optimalityOf({ ...below, certificate: { ...below.certificate, certified: false } })).toBe('none');
  });
});
