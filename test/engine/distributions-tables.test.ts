// Printed tables (../shared/REFERENCES.md): each value checked to the decimals it is printed with.
import { expect } from 'chai';
import * as D from '@shared/engine/distributions/index';

const printed = (value: number, decimals: number): string => value.toFixed(decimals);

describe('distributions: published tables', () => {
  describe('NIST/SEMATECH e-Handbook, Table 1.3.6.7.4 (critical values of the chi-square distribution)', () => {
    const rows: [number, number, string][] = [
      [0.95, 10, '18.307'],
      [0.99, 10, '23.209'],
      [0.05, 10, '3.940'],
      [0.95, 1, '3.841'],
      [0.95, 5, '11.070'],
      [0.95, 30, '43.773'],
      [0.99, 20, '37.566'],
    ];
    for (const [p, df, value] of rows) {
      it(`chi²(${p}, ${df}) = ${value}`, () => {
        expect(printed(D.chisqQuantile(p, df), 3)).to.equal(value);
        expect(printed(D.chisqQuantileUpper(1 - p, df), 3)).to.equal(value);
      });
    }
  });

  describe('NIST/SEMATECH e-Handbook, Table 1.3.6.7.2 (upper 5 % critical values of the F distribution)', () => {
    const rows: [number, number, string][] = [
      [2, 20, '3.493'],
      [3, 30, '2.922'],
      [10, 10, '2.978'],
      [4, 15, '3.056'],
      [1, 10, '4.965'],
      [5, 10, '3.326'],
    ];
    for (const [d1, d2, value] of rows) {
      it(`F(0.95; ${d1}, ${d2}) = ${value}`, () => {
        expect(printed(D.fQuantile(0.95, d1, d2), 3)).to.equal(value);
        expect(printed(D.fQuantileUpper(0.05, d1, d2), 3)).to.equal(value);
      });
    }
  });

  describe('NIST/SEMATECH e-Handbook 1.3.5.8, 7.2.3, 1.3.5.9 and 7.3.2 critical values', () => {
    it('1.3.5.8: chi-square df 99 critical values 73.361, 128.422 (alpha/2 = 0.025) and 77.046, 123.225 (alpha = 0.05)', () => {
      expect(printed(D.chisqQuantile(0.025, 99), 3)).to.equal('73.361');
      expect(printed(D.chisqQuantileUpper(0.025, 99), 3)).to.equal('128.422');
      expect(printed(D.chisqQuantile(0.05, 99), 3)).to.equal('77.046');
      expect(printed(D.chisqQuantileUpper(0.05, 99), 3)).to.equal('123.225');
    });
    it('7.2.3: chi-square df 9: 16.919, 19.023 upper; 3.325, 2.700 lower; T = 17.56448 has upper-tail p 0.04058 (computed)', () => {
      expect(printed(D.chisqQuantileUpper(0.05, 9), 3)).to.equal('16.919');
      expect(printed(D.chisqQuantileUpper(0.025, 9), 3)).to.equal('19.023');
      expect(printed(D.chisqQuantile(0.05, 9), 3)).to.equal('3.325');
      expect(printed(D.chisqQuantile(0.025, 9), 3)).to.equal('2.700');
      expect(printed(D.chisqSf(17.56448, 9), 5)).to.equal('0.04058');
    });
    it('1.3.5.9: F df (239, 239) critical values 0.7756 and 1.2894 at alpha = 0.05 two-sided', () => {
      expect(printed(D.fQuantile(0.025, 239, 239), 4)).to.equal('0.7756');
      expect(printed(D.fQuantileUpper(0.025, 239, 239), 4)).to.equal('1.2894');
    });
    it('7.3.2: F df (10, 8): upper 3.347 (0.05) and 4.295 (0.025), lower 0.3256 and 0.2594', () => {
      expect(printed(D.fQuantileUpper(0.05, 10, 8), 3)).to.equal('3.347');
      expect(printed(D.fQuantileUpper(0.025, 10, 8), 3)).to.equal('4.295');
      expect(printed(D.fQuantile(0.05, 10, 8), 4)).to.equal('0.3256');
      expect(printed(D.fQuantile(0.025, 10, 8), 4)).to.equal('0.2594');
    });
    it('1.3.5.7 / 1.3.5.10: chi-square df 9 critical 16.919; F(9, 90) critical 1.9855 at alpha = 0.05', () => {
      expect(printed(D.chisqQuantileUpper(0.05, 9), 3)).to.equal('16.919');
      // printed 1.9855 is truncated: the quantile is 1.985595 (R: qf(0.95, 9, 90) = 1.985594964)
      expect(D.fQuantileUpper(0.05, 9, 90)).to.be.closeTo(1.9855, 1e-4);
    });
  });

  describe('NIST/SEMATECH e-Handbook 7.2.6.3: one-sided normal tolerance factor through the noncentral t', () => {
    // k1 = t'(confidence; n − 1, z_coverage·sqrt(n)) / sqrt(n)
    const k1 = (n: number, coverage: number, confidence: number): number =>
      D.nctQuantile(confidence, n - 1, D.normQuantile(coverage) * Math.sqrt(n)) / Math.sqrt(n);
    it('N = 43, coverage 0.90, confidence 0.99: k1 = 1.8740 (noncentral t)', () => {
      expect(printed(k1(43, 0.9, 0.99), 4)).to.equal('1.8740');
    });
    it('N = 6, coverage 0.90, confidence 0.99: k1 = 4.4111 (noncentral t)', () => {
      expect(printed(k1(6, 0.9, 0.99), 4)).to.equal('4.4111');
    });
    it('chi²(0.01, 42) = 23.650', () => {
      expect(printed(D.chisqQuantile(0.01, 42), 3)).to.equal('23.650');
    });
  });
});
