/** Behaviour checks of the command-line argument readers: what is accepted, and what each refusal says. */
import { describe, expect, it } from 'vitest';
import { parseCommandLine, parseLevels, parseMode, UsageError } from '../../../server/cli/args.ts';

const RUN_OPTIONS = {
  out: { type: 'string', short: 'o' },
  levels: { type: 'string' },
  help: { type: 'boolean', short: 'h' },
} as const;

describe('parseCommandLine', () => {
  it('reads options in both spellings and keeps positionals in order', () => {
    expect(parseCommandLine(['a.json', '--out', 'dir', '--levels=1,2'], RUN_OPTIONS)).toEqual({
      options: { out: 'dir', levels: '1,2' },
      positionals: ['a.json'],
    });
    expect(parseCommandLine(['-o', 'dir', '-h', 'a.json'], RUN_OPTIONS).options).toEqual({ out: 'dir', help: true });
  });

  it('refuses an unknown option, a missing value and a repeated option, naming the option', () => {
    expect(() => parseCommandLine(['--bogus'], RUN_OPTIONS)).toThrow(new UsageError('unknown option --bogus'));
    expect(() => parseCommandLine(['--out'], RUN_OPTIONS)).toThrow(/--out needs a value/);
    expect(() => parseCommandLine(['--out', 'a', '--out', 'b'], RUN_OPTIONS)).toThrow(/--out is given more than once/);
    expect(() => parseCommandLine(['--help=yes'], RUN_OPTIONS)).toThrow(/--help takes no value/);
  });
});

describe('parseLevels', () => {
  it('reads comma-separated positive increasing numbers', () => {
    expect(parseLevels('1,2,5,10')).toEqual([1, 2, 5, 10]);
    expect(parseLevels(' 0.5, 1 ,2e1')).toEqual([0.5, 1, 20]);
    expect(parseLevels('40')).toEqual([40]);
  });

  it.each([
    ['0,1', /--levels: entry 1 \("0"\)/],
    ['-1,2', /--levels: entry 1 \("-1"\)/],
    ['1,,2', /--levels: entry 2 \(""\)/],
    ['1,abc', /--levels: entry 2 \("abc"\)/],
    ['1,0x10', /--levels: entry 2 \("0x10"\)/],
    ['1,Infinity', /--levels: entry 2/],
    ['5,2', /--levels: 2 does not exceed 5/],
    ['1,1', /--levels: 1 does not exceed 1/],
  ])('refuses %j', (text, message) => {
    expect(() => parseLevels(text)).toThrow(UsageError);
    expect(() => parseLevels(text)).toThrow(message);
  });
});

describe('parseMode', () => {
  it('accepts grid and gaussian, refuses anything else with the allowed list', () => {
    expect(parseMode('grid')).toBe('grid');
    expect(parseMode('gaussian')).toBe('gaussian');
    expect(() => parseMode('Gaussian')).toThrow('--mode: "Gaussian" is not a mode; use one of grid, gaussian');
  });
});
