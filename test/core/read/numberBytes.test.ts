/**
 * The byte-level number parser against JavaScript's own `Number()` (ECMAScript's StringToNumber,
 * correctly rounded): bit-identical on hundreds of thousands of generated strings of the grammar,
 * including mantissas beyond 2^53, exponents far outside ±22, subnormals, overflow and -0.
 */
import { strict as assert } from 'node:assert';
import { infinityFromBytes, numberSyntax, parseNumberBytes, PLAIN_NUMBER_SYNTAX } from '../../../src/core/read/numberBytes';

const encoder = new TextEncoder();
const parse = (text: string, syntax = PLAIN_NUMBER_SYNTAX): number => {
  const bytes = encoder.encode(text);
  return parseNumberBytes(bytes, 0, bytes.length, syntax);
};

function randomGenerator(seed: number): () => number {
  let state = seed;
  return () => {
    state = (state * 48271) % 2147483647;
    return (state - 1) / 2147483646;
  };
}

describe('numberBytes: numbers from bytes', function () {
  // Real I/O and long generated inputs on a shared 2-core machine: mocha's 2 s default is too tight.
  this.timeout(120_000);

  it('is bit-identical to Number() on 300 000 generated decimal strings', function () {
    this.timeout(30_000);
    const random = randomGenerator(12345);
    const digits = (n: number): string => Array.from({ length: n }, () => String(Math.floor(random() * 10))).join('');
    for (let i = 0; i < 300_000; i++) {
      const sign = ['', '-', '+'][Math.floor(random() * 3)];
      const integer = digits(Math.floor(random() * 20));
      const fraction = random() < 0.7 ? '.' + digits(Math.floor(random() * 20)) : '';
      if (integer === '' && fraction.length < 2) continue;
      const exponent = random() < 0.5 ? `${random() < 0.5 ? 'e' : 'E'}${['', '-', '+'][Math.floor(random() * 3)]}${Math.floor(random() * (random() < 0.9 ? 30 : 400))}` : '';
      const text = sign + integer + fraction + exponent;
      assert.ok(Object.is(parse(text), Number(text)), `${text}: ${parse(text)} vs ${Number(text)}`);
    }
  });

  it('is bit-identical to Number() on printed doubles (shortest round-trip and 17 digits)', function () {
    this.timeout(30_000);
    const random = randomGenerator(777);
    for (let i = 0; i < 100_000; i++) {
      const value = (random() - 0.5) * 10 ** Math.floor(random() * 60 - 30);
      for (const text of [String(value), value.toPrecision(17), value.toExponential(5), value.toFixed(6)]) {
        assert.ok(Object.is(parse(text), Number(text)), text);
      }
    }
  });

  it('reads the edge cases as Number() does', () => {
    const cases = ['0', '-0', '+0', '-0.0', '0e5', '-0e-400', '.5', '5.', '-.5', '+5.', '1e308', '1.7976931348623157e308', '1.7976931348623159e308', '1e309', '4.9e-324', '2.4e-324', '2.5e-324', '1e-400', '9007199254740993', '9007199254740992', '123456789012345678901234567890', '0.1', '0.30000000000000004', '007', '1E22', '1e23', '1e-22', '1e-23'];
    for (const text of cases) assert.ok(Object.is(parse(text), Number(text)), text);
  });

  it('rejects what the grammar does not describe, though Number() accepts some of it', () => {
    for (const text of ['', '.', '+', '-', 'e5', '1e', '1e+', '0x10', '0b11', '0o7', 'Infinity', ' 1', '1 ', '1_000', '1,5', '--1', '1.2.3', '١٢', 'NaN']) {
      assert.ok(Number.isNaN(parse(text)), text);
    }
  });

  it('reads decimal commas and thousands separators only when asked', () => {
    const european = numberSyntax(true, '.');
    assert.equal(parse('1.234.567,89', european), 1234567.89);
    assert.equal(parse('-0,5', european), -0.5);
    assert.ok(Number.isNaN(parse('1.5', numberSyntax(true, undefined))));
    assert.equal(parse('1_000_000', numberSyntax(false, '_')), 1e6);
    assert.ok(Number.isNaN(parse('_1000', numberSyntax(false, '_'))));
    assert.ok(Number.isNaN(parse('1__000', numberSyntax(false, '_'))));
    assert.ok(Number.isNaN(parse('1.000_5', numberSyntax(false, '_'))), 'separators only in the integer part');
    assert.ok(Object.is(parse('12_345_678_901_234_567_890', numberSyntax(false, '_')), Number('12345678901234567890')));
  });

  it('reads the infinity tokens in any case with a sign', () => {
    const infinity = (text: string): number => {
      const bytes = encoder.encode(text);
      return infinityFromBytes(bytes, 0, bytes.length);
    };
    for (const text of ['Inf', 'inf', 'INF', '+Inf', 'Infinity', 'infinity', '+INFINITY']) assert.equal(infinity(text), Infinity, text);
    for (const text of ['-Inf', '-inf', '-Infinity']) assert.equal(infinity(text), -Infinity, text);
    for (const text of ['in', 'infinite', 'Infinit', '--inf', 'inf ']) assert.equal(infinity(text), 0, text);
  });
});
