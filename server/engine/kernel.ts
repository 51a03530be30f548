/**
 * Utility kernel: one generated loop that computes the utility of every option of a ministep and their
 * maximum, for all the effects of a model at once.
 *
 * Purpose: the simulator's hot path. Walking the effects one by one costs one pass over ego's row per
 * effect plus a pass for the maximum, each re-reading and re-writing the utility array, with a
 * megamorphic call per effect. Most effects have a change statistic of the form
 *
 *   delta_ij = uniform part (depends on j only through x_ij)  +  (1 - 2 x_ij) * g_ij,
 *
 * where g_ij is a short expression over the state's arrays. Each such effect declares its parts as
 * source snippets (`Effect.kernel`, see effects/types.ts); this module pastes the snippets of a model's
 * effects into a single loop, compiles it once per combination of effects with `new Function`, and
 * caches it. Parameters and covariate data are arguments, not constants, so one compiled kernel serves
 * every parameter value and every chain (and V8 keeps one optimised copy).
 *
 * The result is exactly the sum of the effects' `accumulate` rows (up to floating-point summation
 * order); tests/engine/kernel.test.ts checks this for every effect of the catalogue and their mixtures.
 *
 * Snippet language: inside a snippet, `$name` is a name private to the term (a field of `term.data`, or
 * a constant declared in `term.pre`); the loop provides n, i, row = i*n, j, k = row + j and the state's
 * arrays adj, adjT, p2, so, indeg, outdeg. Snippets must be expressions or `const` declarations only.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics.
 *   Sociological Methodology 31, 361-395. (the objective function as a weighted sum of effects)
 * - Wavefit METHODS.md sections 2.1 and 3 (change statistics; the multinomial-logit ministep with the
 *   maximum subtracted before exponentiating).
 */
import type { Effect, KernelTerm } from './effects/types';
import type { NetworkState } from './state';

/**
 * Fills u[j] with the utility of option j for ego i (u[i] = 0, "no change") and returns max_j u[j]
 * (at least 0). Only the effects with a kernel term are included; see `compileUtilityKernel`.
 */
export type UtilityKernel = (state: NetworkState, i: number, u: Float64Array) => number;

type Compiled = (
  state: NetworkState,
  i: number,
  u: Float64Array,
  b: Float64Array,
  d: ReadonlyArray<Readonly<Record<string, unknown>>>,
) => number;

/** Compiled kernels by source, and by effect list and the indices in use (a shortcut to the same functions). */
const bySource = new Map<string, Compiled>();
const byEffects = new WeakMap<ReadonlyArray<Effect>, Map<string, { terms: KernelTerm[]; fn: Compiled }>>();

const NAME = /\$([A-Za-z_][A-Za-z0-9_]*)/g;
const SAFE = /^[\s\w$.+\-*/%()[\]<>=!?:;,&|^~'"]*$/;

/** A snippet with its private names `$x` renamed to `t{index}_x`. */
function localise(snippet: string, index: number, key: string): string {
  if (!SAFE.test(snippet)) throw new Error(`kernel: the snippet of ${key} contains characters a kernel snippet may not use`);
  return snippet.replace(NAME, (_m, name: string) => `t${index}_${name}`);
}

/** The JavaScript source of the kernel for the given terms (exported so a reader can print it). */
export function kernelSource(terms: ReadonlyArray<{ key: string; term: KernelTerm }>): string {
  const head: string[] = [];
  const create: string[] = [];
  const remove: string[] = [];
  const pair: string[] = [];
  terms.forEach(({ key, term }, t) => {
    head.push(`const b${t} = b[${t}];`);
    for (const name of Object.keys(term.data ?? {})) {
      if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(name)) throw new Error(`kernel: ${key} has a data field with an unusable name "${name}"`);
      head.push(`const t${t}_${name} = d[${t}].${name};`);
    }
    if (term.pre !== undefined) head.push(localise(term.pre, t, key));
    if (term.create !== undefined) create.push(`b${t} * (${localise(term.create, t, key)})`);
    if (term.remove !== undefined) remove.push(`b${t} * (${localise(term.remove, t, key)})`);
    if (term.pair !== undefined) pair.push(`b${t} * (${localise(term.pair, t, key)})`);
  });
  const utility =
    pair.length === 0
      ? 'const v = adj[k] !== 0 ? remove : create;'
      : `const g = ${pair.join(' + ')};\n    const v = adj[k] !== 0 ? remove - g : create + g;`;
  // Ego's own option (j = i, "no change") is skipped by splitting the loop, so its utility stays 0.
  const body = `const k = row + j;\n    ${utility}\n    u[j] = v;\n    if (v > max) max = v;`;
  return [
    '"use strict";',
    'return function utilityKernel(state, i, u, b, d) {',
    'const n = state.n; const adj = state.adj; const adjT = state.adjT; const p2 = state.p2; const so = state.so;',
    'const indeg = state.indeg; const outdeg = state.outdeg; const row = i * n;',
    ...head,
    `const create = ${create.length ? create.join(' + ') : '0'};`,
    `const remove = ${remove.length ? remove.join(' + ') : '0'};`,
    'let max = 0;',
    `for (let j = 0; j < i; j++) {\n    ${body}\n}`,
    `for (let j = i + 1; j < n; j++) {\n    ${body}\n}`,
    'u[i] = 0;',
    'return max;',
    '};',
  ].join('\n');
}

/**
 * The kernel for the effects whose index is listed in `use` (each must have a `kernel` term), with the
 * given parameters. Compiled code is cached by source, so repeated calls (every period of every chain)
 * cost one map lookup.
 *
 * @throws Error("kernel: ...") when a listed effect has no kernel term or a snippet is malformed
 */
export function compileUtilityKernel(effects: ReadonlyArray<Effect>, params: ArrayLike<number>, use: ReadonlyArray<number>): UtilityKernel {
  const terms = use.map((k) => {
    const term = effects[k].kernel;
    if (term === undefined) throw new Error(`kernel: ${effects[k].key} has no kernel term`);
    return { key: effects[k].key, term };
  });
  // Building the source costs tens of microseconds, so the same effect list with the same terms in use
  // (every period of every chain of a batch or a fit) skips it.
  let byUse = byEffects.get(effects);
  if (byUse === undefined) {
    byUse = new Map();
    byEffects.set(effects, byUse);
  }
  const useKey = use.join(',');
  const hit = byUse.get(useKey);
  let fn: Compiled;
  if (hit !== undefined && hit.terms.every((term, t) => term === terms[t].term)) {
    fn = hit.fn;
  } else {
    const source = kernelSource(terms);
    const known = bySource.get(source);
    if (known !== undefined) fn = known;
    else {
      try {
        fn = new Function(source)() as Compiled;
      } catch (e) {
        throw new Error(`kernel: the generated utility loop does not compile (${(e as Error).message})`);
      }
      bySource.set(source, fn);
    }
    byUse.set(useKey, { terms: terms.map(({ term }) => term), fn });
  }
  const b = Float64Array.from(use, (k) => params[k]);
  const d = terms.map(({ term }) => term.data ?? {});
  const kernel = fn;
  return function utilityKernel(state, i, u) {
    return kernel(state, i, u, b, d);
  };
}
