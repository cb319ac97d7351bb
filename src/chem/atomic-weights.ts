/**
 * Standard atomic weights, g/mol.
 *
 * Source: IUPAC/CIAAW, "Standard atomic weights of the elements 2021 (IUPAC Technical Report)",
 * T. Prohaska et al., Pure Appl. Chem. 2022;94(5):573-600, doi:10.1515/pac-2019-0603,
 * Table 2 "abridged standard atomic weights" (five significant figures, or fewer where the
 * natural variation is larger). For elements whose standard atomic weight is an interval
 * (H, C, N, O, Mg, S, Cl) the abridged value is the one IUPAC gives for normal materials.
 * The figures below are typed from memory of that table and agree with the values the product
 * brief fixes for P, O, H, Na, K, Ca, Mg, Al, Fe, N and C.
 */
export const ATOMIC_WEIGHTS_SOURCE =
  'IUPAC/CIAAW standard atomic weights 2021, abridged values (Prohaska et al., Pure Appl Chem 2022;94:573-600)';

export const ATOMIC_WEIGHTS_G_PER_MOL: Readonly<Record<string, number>> = Object.freeze({
  H: 1.008, // abridged 1.0080 +/- 0.0002
  C: 12.011,
  N: 14.007,
  O: 15.999,
  F: 18.998,
  Na: 22.99, // 22.990
  Mg: 24.305,
  Al: 26.982,
  Si: 28.085,
  P: 30.974,
  S: 32.06,
  Cl: 35.45,
  K: 39.098,
  Ca: 40.078,
  Mn: 54.938,
  Fe: 55.845,
  Cu: 63.546,
  Zn: 65.38,
  Se: 78.971,
  I: 126.9,
});
