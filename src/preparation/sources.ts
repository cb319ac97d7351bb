/**
 * Published sources behind the preparation table (cited by the original papers). `checked` says
 * what was actually read: the figures quoted here were compared with the paper's published
 * abstract or a report of it; anything else in the table is marked "from memory" in the code and
 * shown to users as "assumed (no published figure)".
 */
export type PreparationSourceId =
  | 'cupisti-2006'
  | 'vrdoljak-2015'
  | 'ando-2015'
  | 'uenishi-2022'
  | 'bethke-jansky-2008'
  | 'burrowes-ramer-2006'
  | 'usda-sr28-pairs';

export interface PreparationSource {
  citation: string;
  /** The figures the table relies on, as published. */
  figures: string;
  checked: string;
}

export const PREPARATION_SOURCES: Record<PreparationSourceId, PreparationSource> = {
  'cupisti-2006': {
    citation:
      'Cupisti A, Comar F, Benini O et al. Effect of boiling on dietary phosphate and nitrogen intake. J Ren Nutr 2006;16(1):36-40',
    figures:
      'fresh beef and chicken breast boiled 10-30 min, true retention: beef dry matter 92 +/- 6%, protein 87 +/- 10%, phosphorus 42 +/- 13%; chicken breast 93 +/- 3%, 81 +/- 4%, 63 +/- 6%',
    checked: 'figures checked against the published abstract (PubMed 16414439)',
  },
  'vrdoljak-2015': {
    citation:
      'Vrdoljak I, Panjkota Krbavcic I et al. Thermal processing of foodstuffs for dialysis patients. J Ren Nutr 2015;25:308-315',
    figures:
      'boiling in water or stewing in oil with some water lowered phosphorus by 27-43% in fresh and frozen vegetables (potatoes, carrots, green beans), 10-49% in meat (chicken, beef, pork), 7% in pasta and 22.8% in rice, dry-weight basis; protein mostly unchanged; boiling in hard water raised calcium in every food',
    checked:
      'figures checked against published reports of the abstract; title shortened, author order and pages as usually cited',
  },
  'ando-2015': {
    citation:
      'Ando S, Sakuma M, Morimoto Y, Arai H. The effect of various boiling conditions on reduction of phosphorus and protein in meat. J Ren Nutr 2015;25(6), doi 10.1053/j.jrn.2015.05.005',
    figures:
      'beef sliced and boiled 30 min kept about half the phosphorus of an uncut block boiled 10 min; soft water did better than hard water, 5% acetate or 0.5% bicarbonate; the pressure cooker was effective; protein kept',
    checked: 'figures checked against the published abstract and a report of it',
  },
  'uenishi-2022': {
    citation:
      'Uenishi K, Tomita K, Kido S. Effect of various thermal processing methods and pretreatment methods to reduce phosphorus content of chicken meat for CKD patients. Nutr Food Sci 2023;53(1), doi 10.1108/NFS-12-2021-0384 (online 2022)',
    figures:
      'chicken phosphorus retention: boiled 65%, baked 89%, steamed 73%, microwaved 75%; stabbed then boiled 58%, cut then boiled 46%',
    checked: 'figures checked against the published abstract',
  },
  'bethke-jansky-2008': {
    citation:
      'Bethke PC, Jansky SH. The effects of boiling and leaching on the content of potassium and other minerals in potatoes. J Food Sci 2008;73(5)',
    figures:
      'cubing or shredding potatoes before boiling lowered potassium and other minerals by up to 75%; soaking overnight had no significant effect',
    checked: 'figures checked against the USDA ARS report of the study (24 June 2008)',
  },
  'burrowes-ramer-2006': {
    citation:
      'Burrowes JD, Ramer NJ. Removal of potassium from tuberous root vegetables by leaching. J Ren Nutr 2006;16(4), doi 10.1053/j.jrn.2006.07.012',
    figures:
      'soaking did not leach significant potassium from most tubers; boiling, rinsing and boiling again leached more than one boiling (92% vs 54% of tubers still above 200 mg/100 g)',
    checked: 'figures checked against the published abstract',
  },
  'usda-sr28-pairs': {
    citation: 'USDA National Nutrient Database for Standard Reference, Release 28 (2015)',
    figures: 'raw and cooked entries of the same food, compared per 100 g (water and protein)',
    checked: 'read from the release itself',
  },
};

/**
 * The USDA Table of Nutrient Retention Factors, Release 6 (2007) is the usual source for minerals
 * in boiled and drained foods, but its values could not be checked here: none of them is used,
 * and where the table would have been the source the factor is marked from memory instead.
 */
export const USDA_RETENTION_R6_NOTE =
  'USDA Table of Nutrient Retention Factors, Release 6 (2007): not used, its values could not be checked';
