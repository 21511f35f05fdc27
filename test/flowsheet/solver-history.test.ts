import { describe, expect, it } from 'vitest';
import { loadFlowsheet } from '../../src/flowsheet/validate.js';
import { solveFlowsheet, NEWTON_WARMUP_PASSES } from '../../src/flowsheet/solve.js';

/**
 * The residual history of a flowsheet solve holds every pass of the iteration under its own
 * number. Newton from a cold start runs NEWTON_WARMUP_PASSES direct passes first; they are
 * passes of the solve like any other. Checked against a second, independent computation: the
 * direct method's own history of the same loop from the same start, whose first passes are the
 * same evaluations (g at the same iterates).
 */
describe('history of a Newton solve from a cold start', () => {
  const { model } = loadFlowsheet('flowsheets/methanol-pilot.yaml');
  const direct = solveFlowsheet(model, { method: 'direct', maxPasses: 10 });
  const newton = solveFlowsheet(model, { method: 'newton' });

  it('numbers its passes in order, within the passes counted, and starts with the direct passes before Newton', () => {
    expect(newton.status).toBe('converged');
    const h = newton.history;
    for (let k = 1; k < h.length; k++) expect(h[k].pass).toBeGreaterThan(h[k - 1].pass);
    expect(h[h.length - 1].pass).toBeLessThanOrEqual(newton.passes);
    expect(h.slice(0, NEWTON_WARMUP_PASSES).map((e) => [e.pass, e.method])).toEqual(
      Array.from({ length: NEWTON_WARMUP_PASSES }, (_, k) => [k + 1, 'direct']),
    );
  });

  it('records at each pass number the residual that the direct method measures at that pass', () => {
    // Passes 1..3 are direct passes in both solves; pass 4 is g at the same iterate (the third
    // direct step), Newton's first measure.
    for (let k = 0; k <= NEWTON_WARMUP_PASSES; k++) {
      expect(newton.history[k].pass).toBe(direct.history[k].pass);
      expect(newton.history[k].scaled).toBe(direct.history[k].scaled);
      expect(newton.history[k].residual).toBe(direct.history[k].residual);
    }
    expect(newton.history[NEWTON_WARMUP_PASSES].method).toBe('newton');
  });
});

/**
 * A loop whose tears met their tolerance but whose balance is still open when the budget of
 * passes is spent: the message gives the budget as the cause. On the methanol pilot, Newton
 * leaves the energy balance to the converged flows; with 26 passes its temperatures are not yet
 * settled (energy balance open by about 1e-2), with 27 the same solve converges. The hint about
 * traces and splits near 0 or 1 (and "try --method newton", to a Newton solve) was wrong there.
 */
describe('an open balance at the end of the budget', () => {
  const { model } = loadFlowsheet('flowsheets/methanol-pilot.yaml');

  it('is put down to the budget, which one more pass shows to be the cause', () => {
    const short = solveFlowsheet(model, { method: 'newton', maxPasses: 26 });
    expect(short.status).toBe('not-converged');
    expect(short.message).toMatch(/tear streams meet their tolerance/);
    expect(short.message).toMatch(/budget of 26 passes/);
    expect(short.message).not.toMatch(/trace component/);
    const more = solveFlowsheet(model, { method: 'newton', maxPasses: 27 });
    expect(more.status).toBe('converged');
    expect(more.balance.worst).toBeLessThanOrEqual(1e-9);
  });
});

/**
 * The counts in a message agree with the solve's own count of passes. The method's message
 * counts its passes; the solve adds the final pass at the last iterate (and Newton's direct
 * passes before it). Before, `--max-passes 3` by direct substitution printed a status of 3 passes
 * beside "did not converge in 2 passes", and `auto` with a budget too small for Newton told the
 * user to "use --method newton or auto".
 */
describe('the passes a message speaks of', () => {
  const { model } = loadFlowsheet('flowsheets/methanol-pilot.yaml');

  it('are the passes of the solve, the final pass counted', () => {
    for (const [method, maxPasses] of [['direct', 3], ['wegstein', 5], ['newton', 5], ['anderson', 2], ['auto', 10]] as const) {
      const r = solveFlowsheet(model, { method, maxPasses });
      expect(r.status).toBe('not-converged');
      expect(r.passes).toBeLessThanOrEqual(maxPasses);
      expect(r.message).toContain(`; ${r.passes} passes in all, counting the final pass`);
      // no Jacobian fits these budgets: every pass but the final one is in the history, in order
      expect(r.history.map((h) => h.pass)).toEqual(Array.from({ length: r.passes - 1 }, (_, k) => k + 1));
    }
  });

  it('says when the final pass goes beyond a budget of one pass', () => {
    const r = solveFlowsheet(model, { method: 'direct', maxPasses: 1 });
    expect(r.status).toBe('not-converged');
    expect(r.passes).toBe(2);
    expect(r.message).toContain('2 passes in all, one more than the budget of 1');
  });

  it("under 'auto', a budget spent on Wegstein asks for passes, not for the method that is running", () => {
    const r = solveFlowsheet(model, { method: 'auto', maxPasses: 5 });
    expect(r.status).toBe('not-converged');
    expect(r.message).not.toMatch(/--method newton or auto/);
    expect(r.message).toMatch(/Wegstein used the whole budget \(4 passes\) before Newton could start/);
  });
});
