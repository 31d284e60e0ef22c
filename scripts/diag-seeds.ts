import { SCENARIOS, runOne } from "./engine-accuracy";
const name = process.argv[2];
const sc = SCENARIOS.find((s) => s.name === name)!;
for (let seed = 41; seed <= 50; seed++) for (const fg of [true]) {
  const r = await runOne(sc, seed, fg);
  console.log(seed, fg ? "given" : "no   ", r.balance.map((x) => (x === undefined ? "  -  " : x.toFixed(2).padStart(6))).join(" "), "shift", r.shift?.toFixed(2), r.model, r.covered.join(""));
}
