/**
 * The SVG plot writer and `looprig run --svg`: well-formed documents, ticks, escaping, min/max
 * decimation keeping spikes, broken lines at non-finite values, and the trial plot's contents.
 */
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { niceTicks, svgPlot, xmlEscape } from '../../src/cli/svg-plot.js';
import { fakeIo } from './fake-io.js';

/** Check that tags nest properly (a small stand-in for an XML parser) and return the element names. */
function elements(svg: string): string[] {
  const body = svg.replace(/^<\?xml[^>]*\?>\s*/, '');
  const stack: string[] = [];
  const names: string[] = [];
  const re = /<(\/?)([A-Za-z][\w:-]*)((?:\s+[\w:-]+="[^"<]*")*)\s*(\/?)>/g;
  let last = 0;
  let m: RegExpExecArray | null;
  while ((m = re.exec(body)) !== null) {
    // Between tags there is only text without raw '<' or '&' that is not an entity.
    const between = body.slice(last, m.index);
    expect(between).not.toMatch(/<|&(?!amp;|lt;|gt;|quot;)/);
    last = re.lastIndex;
    const [, close, name, , selfClose] = m;
    if (close) expect(stack.pop()).toBe(name);
    else {
      names.push(name);
      if (!selfClose) stack.push(name);
    }
  }
  expect(body.slice(last).trim()).toBe('');
  expect(stack).toEqual([]);
  expect(names[0]).toBe('svg');
  return names;
}

describe('svgPlot', () => {
  const t = Float64Array.from({ length: 101 }, (_, i) => i);
  const v = Float64Array.from(t, (x) => Math.sin(x / 10));

  it('a well-formed standalone SVG with title, axis labels, legend and one path per series', () => {
    const svg = svgPlot({
      title: 'A & B <test>',
      subtitle: 'sub "title"',
      xLabel: 'time (s)',
      t0: 0,
      t1: 100,
      panels: [
        {
          yLabel: 'value (m)',
          series: [{ label: 'sine', t, v, color: '#123456' }],
          bands: [{ label: 'band', t0: 20, t1: 80, lo: -0.1, hi: 0.1, color: '#00ff00' }],
          limits: [{ label: 'limit', value: 0.9, t0: 0, t1: 100, color: '#ff0000', dash: '4 2' }],
        },
        { yLabel: 'u', series: [{ label: 'step', t, v, color: '#000', step: true }] },
      ],
      markers: [{ t: 50, label: 'event' }],
    });
    const names = elements(svg);
    expect(names.filter((n) => n === 'path').length).toBe(2);
    expect(svg).toContain('<title>A &amp; B &lt;test&gt;</title>');
    expect(svg).toContain('sub &quot;title&quot;');
    for (const s of ['time (s)', 'value (m)', '>sine<', '>band<', '>limit<', '>event<']) expect(svg).toContain(s);
    expect(svg).not.toMatch(/NaN|Infinity|undefined/);
  });

  it('a staircase series has a horizontal then vertical segment per sample', () => {
    const svg = svgPlot({
      title: 'x',
      xLabel: 't',
      t0: 0,
      t1: 2,
      panels: [{ yLabel: 'y', series: [{ label: 's', t: [0, 1, 2], v: [0, 1, 0], color: '#000', step: true }] }],
    });
    const d = /<path d="([^"]+)"/.exec(svg)![1];
    expect(d.split(' ').length).toBe(5); // M p0, L (1, 0), L (1, 1), L (2, 1), L (2, 0)
  });

  it('non-finite values break the line instead of printing NaN', () => {
    const vv = Float64Array.from(v);
    vv[50] = NaN;
    vv[70] = Infinity;
    const svg = svgPlot({ title: 'x', xLabel: 't', t0: 0, t1: 100, panels: [{ yLabel: 'y', series: [{ label: 's', t, v: vv, color: '#000' }] }] });
    expect(svg.match(/<path /g)!.length).toBe(3);
    expect(svg).not.toMatch(/NaN|Infinity/);
  });

  it('a 200 000-sample series is drawn from its min/max per pixel column: small file, spike kept', () => {
    const n = 200_000;
    const tt = Float64Array.from({ length: n }, (_, i) => i * 1e-3);
    const vv = new Float64Array(n);
    vv[123_457] = 10; // one-sample spike, far narrower than a pixel column
    const svg = svgPlot({
      title: 'x',
      xLabel: 't',
      t0: 0,
      t1: tt[n - 1],
      height: 400,
      panels: [{ yLabel: 'y', series: [{ label: 's', t: tt, v: vv, color: '#000' }] }],
    });
    expect(svg.length).toBeLessThan(60_000);
    const d = /<path d="([^"]+)"/.exec(svg)![1];
    const ys = d.split(' ').map((p) => Number(p.slice(1).split(',')[1]));
    // The spike is the top of the padded range: 5 % below the panel's top edge.
    expect(Math.min(...ys)).toBeLessThan(Math.max(...ys) - 100);
  });

  it('niceTicks steps by 1, 2 or 5 x 10^k and covers the range', () => {
    expect(niceTicks(0, 10, 5)).toEqual([0, 2, 4, 6, 8, 10]);
    expect(niceTicks(0.13, 0.87, 6)).toEqual([0.2, 0.4, 0.6, 0.8]); // raw step 0.123 -> 0.2
    expect(niceTicks(-3, 7, 4)).toEqual([0, 5]); // raw step 2.5 -> 5
    expect(niceTicks(-3, 7, 5)).toEqual([-2, 0, 2, 4, 6]);
    expect(niceTicks(0, 3600, 10)).toEqual([0, 500, 1000, 1500, 2000, 2500, 3000, 3500]);
  });

  it('xmlEscape escapes the five characters that matter in text and attributes', () => {
    expect(xmlEscape('a<b>&"c"')).toBe('a&lt;b&gt;&amp;&quot;c&quot;');
  });
});

describe('looprig run --svg', () => {
  it('writes the trial plot: setpoint, process value, controller output, requirement bands, minutes axis', async () => {
    const io = fakeIo();
    expect(await main(['run', 'plants/surge-tank.yaml', '--svg', 'out.svg'], io)).toBe(0);
    const svg = io.files.get('out.svg')!;
    elements(svg);
    for (const s of [
      'Surge tank level: trial',
      'time (min)',
      '>setpoint<',
      '>process value<',
      '>measured (sensor)<',
      '>controller output (applied)<',
      '>actuator limits<',
      'overshoot limit 10 %',
      'settling band ±2 % (from settling_time limit)',
      'extra_inflow 0.0015',
    ]) {
      expect(svg).toContain(s);
    }
    expect(svg).not.toContain('in service');
    expect(svg).not.toMatch(/NaN/);
    // The axes carry the file's units (model.output_unit: m, actuator.unit: fraction).
    expect(svg).toContain('>process value (m)<');
    expect(svg).toContain('>controller output (fraction)<');
    expect(svg).not.toContain('units)');
  });

  it('without units in the file the axes name the quantity alone', async () => {
    const io = fakeIo();
    expect(await main(['run', 'test/fixtures/plants/surge-tank.yaml', '--svg', 'bare.svg'], io)).toBe(0);
    const svg = io.files.get('bare.svg')!;
    elements(svg);
    expect(svg).toContain('>process value<');
    expect(svg).toContain('>controller output<');
    expect(svg).not.toContain('model output units');
  });

  it('a unit with XML characters is escaped on the axis', async () => {
    const io = fakeIo();
    const text = io.readText('plants/drum-level.yaml').replace('output_unit: mm', "output_unit: 'mm<&>'");
    io.files.set('odd.yaml', text);
    expect(await main(['run', 'odd.yaml', '--svg', 'odd.svg'], io)).toBe(0);
    const svg = io.files.get('odd.svg')!;
    elements(svg);
    expect(svg).toContain('>process value (mm&lt;&amp;&gt;)<');
  });

  it('with --set the file\'s own gains are drawn as the set in service', async () => {
    const io = fakeIo();
    expect(await main(['run', 'plants/levitated-ball.yaml', '--set', 'kc=0.4', '--svg', 'b.svg'], io)).toBe(0);
    const svg = io.files.get('b.svg')!;
    expect(svg).toContain('>in service (gains in the file)<');
    expect(svg).toContain('time (s)');
    expect(svg).toContain('FAILED: settling_time');
  });

  it('an unwritable --svg target: exit 2 with the reason', async () => {
    const io = fakeIo();
    io.writeText = () => {
      throw new Error('EACCES: permission denied');
    };
    expect(await main(['run', 'plants/surge-tank.yaml', '--svg', '/nope/x.svg'], io)).toBe(2);
    expect(io.stderr).toBe('looprig: cannot write /nope/x.svg: EACCES: permission denied\n');
  });
});
