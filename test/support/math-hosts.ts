// Measurement, not a test: how often Chromium's Math functions give other bits than this Node's,
// over 20,000 seeded arguments each (docs/reliability.md, "Across hosts").
//   node --import tsx test/support/math-hosts.ts

import { launch } from './browser-harness.ts';

const sample = () => {
  const out: Record<string, number[]> = {
    sin: [],
    cos: [],
    tan: [],
    exp: [],
    log: [],
    pow: [],
    atan2: [],
    tanh: [],
    sqrt: [],
    hypot: [],
  };
  let s = 12345;
  for (let k = 0; k < 20000; k++) {
    s = (s * 1103515245 + 12345) % 2147483648;
    const x = (s / 2147483648) * 4 - 2;
    out.sin.push(Math.sin(x * 3));
    out.cos.push(Math.cos(x * 3));
    out.tan.push(Math.tan(x));
    out.exp.push(Math.exp(x * 5));
    out.log.push(Math.log(Math.abs(x) + 1e-3));
    out.pow.push(Math.pow(Math.abs(x) + 0.1, 1.7));
    out.atan2.push(Math.atan2(x, 0.7));
    out.tanh.push(Math.tanh(x));
    out.sqrt.push(Math.sqrt(Math.abs(x)));
    out.hypot.push(Math.hypot(x, 0.3));
  }
  return out;
};

const browser = await launch();
try {
  const page = await browser.newPage();
  const inPage = await page.evaluate(sample);
  const inNode = sample();
  console.log(
    `Chromium ${browser.version()}, Node ${process.version} (V8 ${process.versions.v8}): differing results of 20000`,
  );
  for (const k of Object.keys(inNode))
    console.log(`  ${k.padEnd(6)} ${inNode[k].filter((v, i) => !Object.is(v, inPage[k][i])).length}`);
} finally {
  await browser.close();
}
