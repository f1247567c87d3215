/** The failure lines `npm test` prints again above its summary (scripts/failure-excerpt.ts). */
import { failureExcerpt } from '../../scripts/failure-excerpt';

describe('failureExcerpt', () => {
  it("keeps node's failing-tests section without colours, blanks or stack frames", () => {
    const log = [
      '\u001b[32m✔ passes (12ms)\u001b[39m',
      '\u001b[31m✖ failing tests:\u001b[39m',
      '',
      'test at test/e2e/coolant.e2e.ts:217:3',
      '\u001b[31m✖ admin: saves an edit (30021ms)\u001b[39m',
      "  AssertionError [ERR_ASSERTION]: The input did not match /demo/i. Input: ''",
      '      at TestContext.<anonymous> (test/e2e/coolant.e2e.ts:226:12)',
    ].join('\n');
    expect(failureExcerpt(log)).toEqual([
      'test at test/e2e/coolant.e2e.ts:217:3',
      '✖ admin: saves an edit (30021ms)',
      "  AssertionError [ERR_ASSERTION]: The input did not match /demo/i. Input: ''",
    ]);
  });

  it("keeps each jest '●' failure once with the lines of its message, not the '● Console' blocks", () => {
    const failure = [
      '  ● suite › one',
      '',
      '    expect(received).toBe(expected)',
      '    Expected: 2',
      '    Received: 3',
      '      at Object.<anonymous> (a.test.ts:3:1)',
    ];
    const log = ['  ● Console', '    console.log', '      something logged', ...failure, 'FAIL a.test.ts', 'Summary of all failing tests', ...failure].join(
      '\n',
    );
    expect(failureExcerpt(log)).toEqual(['  ● suite › one', '    expect(received).toBe(expected)', '    Expected: 2', '    Received: 3']);
  });

  it('else keeps the last lines, each cut to a readable length', () => {
    const log = Array.from({ length: 100 }, (_, i) => `line ${i}`).join('\n') + '\n' + 'x'.repeat(500);
    const out = failureExcerpt(log);
    expect(out).toHaveLength(40);
    expect(out[0]).toBe('line 61');
    expect(out.at(-1)).toHaveLength(241);
  });
});
