import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import { isDecimalText, parseNumberField } from '../../src/io/csv.js';

const where = { file: 'f.csv', line: 4, column: 'x' };

describe('numbers in text files are decimal only', () => {
  // ECMA-262 (ECMAScript 2023), section 7.1.4.1.1 StringToNumber: Number() also reads the prefixes 0x, 0o, 0b,
  // "Infinity" and white space alone (as 0). Checked here against Number() itself, so the test fails if the
  // engine stops reading them (and the guard would be moot) or the guard stops refusing them.
  it.each([
    ['0x1A', 26],
    ['0X1a', 26],
    ['0b1', 1],
    ['0o7', 7],
    ['Infinity', Infinity],
    ['\u00a0', 0],
    ['\v', 0],
    ['\n', 0],
  ])("refuses '%s', which Number() reads as %s", (text, asNumber) => {
    expect(Number(text)).toBe(asNumber);
    expect(isDecimalText(text)).toBe(false);
    let caught: unknown;
    try {
      parseNumberField(text, where);
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(UserError);
    expect((caught as UserError).describe()).toMatch(
      /^f\.csv:4: '.*' is not (a|a finite) number in column x/,
    );
  });

  it('says to write hexadecimal numbers in decimal', () => {
    expect(() => parseNumberField('0x1A', where)).toThrow(
      /'0x1A' is not a number in column x \(write numbers in decimal\)/,
    );
    expect(() => parseNumberField('', where)).toThrow(/'' is not a number/);
    expect(() => parseNumberField('   ', where)).toThrow(/is not a number/);
  });

  it.each([
    ['0', 0],
    ['-0.5', -0.5],
    ['+3', 3],
    ['.5', 0.5],
    ['5.', 5],
    ['1e-3', 0.001],
    ['2.5E+2', 250],
    ['007', 7],
    ['0.1', 0.1],
    [' 12 ', 12],
  ])("reads the decimal '%s' as %s", (text, value) => {
    expect(parseNumberField(text, where)).toBe(value);
  });
});
