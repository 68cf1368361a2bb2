/**
 * Published reference densities and hardness for the woods this trade stabilizes most.
 *
 * SG basis: basic SG = oven-dry mass / green volume; SG at 12 % = oven-dry mass / volume at 12 % MC.
 * Side hardness at 12 % MC in newtons: the load to embed an 11.3 mm (0.444 in) steel ball to half its
 * diameter (ASTM D143). Where the handbook's metric cell was not read, the 12 % inch-pound value of
 * Table 5-3b is converted with 1 lbf = 4.448222 N (NIST SP 811) and rounded to 10 N; the row says so.
 *
 * Every row names its table. Rows whose values were read in a copy of the table (or a transcription of
 * it) are checked in the tests against the copied files in tests/reference/; rows recalled from memory
 * say so in their notes and have `checkedIn: null`.
 */

const HANDBOOK = 'USDA FPL-GTR-190 (Wood Handbook, 2010) Tables 5-3a/5-3b';
const FIA = 'USDA FS FIA REF_SPECIES';
const FROM_MEMORY = 'values recalled from memory of FPL-GTR-190 Table 5-3a, not checked against a copy of the table';

/** Which copied reference file a value was taken from; null when it is from memory. */
export type ReferenceFile = 'wood-handbook-species-sg-hardness.csv' | 'fia-ref-species-sg-subset.csv';

export interface HandbookSpeciesRow {
  commonName: string;
  botanicalName: string;
  basicSg: number;
  sg12: number;
  sideHardnessN: number | null;
  source: string;
  notes: string;
  checkedIn: { sg: ReferenceFile | null; hardness: ReferenceFile | null };
}

const fromTable = (note: string): Pick<HandbookSpeciesRow, 'source' | 'notes' | 'checkedIn'> => ({
  source: HANDBOOK,
  notes: note,
  checkedIn: { sg: 'wood-handbook-species-sg-hardness.csv', hardness: 'wood-handbook-species-sg-hardness.csv' },
});
const lbf = (value: number) => `side hardness converted from ${value} lbf (Table 5-3b)`;
const hardnessRecalled = 'the handbook file marks this hardness as recalled from memory';

export const HANDBOOK_SPECIES: readonly HandbookSpeciesRow[] = [
  {
    commonName: 'Maple, sugar',
    botanicalName: 'Acer saccharum',
    basicSg: 0.56,
    sg12: 0.63,
    sideHardnessN: 6400,
    ...fromTable('hard maple; SG agrees with FIA REF_SPECIES'),
  },
  {
    commonName: 'Maple, red',
    botanicalName: 'Acer rubrum',
    basicSg: 0.49,
    sg12: 0.54,
    sideHardnessN: 4230,
    ...fromTable(`soft maple; ${lbf(950)}; SG agrees with FIA REF_SPECIES`),
  },
  {
    commonName: 'Maple, silver',
    botanicalName: 'Acer saccharinum',
    basicSg: 0.44,
    sg12: 0.47,
    sideHardnessN: 3110,
    ...fromTable(`soft maple; ${lbf(700)}; ${hardnessRecalled}`),
  },
  {
    commonName: 'Maple, bigleaf',
    botanicalName: 'Acer macrophyllum',
    basicSg: 0.44,
    sg12: 0.48,
    sideHardnessN: 3780,
    ...fromTable(`burls common; ${lbf(850)}; ${hardnessRecalled}`),
  },
  {
    commonName: 'Box elder',
    botanicalName: 'Acer negundo',
    basicSg: 0.42,
    sg12: 0.46,
    sideHardnessN: 3200,
    source: `${FIA} (SPCD 313, citation code 19)`,
    notes: 'not in Table 5-3; side hardness about 720 lbf is recalled from memory as a commonly quoted figure, not read in a published table',
    checkedIn: { sg: 'fia-ref-species-sg-subset.csv', hardness: null },
  },
  {
    commonName: 'Buckeye, yellow',
    botanicalName: 'Aesculus flava',
    basicSg: 0.33,
    sg12: 0.36,
    sideHardnessN: 1600,
    source: `${HANDBOOK} (from memory)`,
    notes: `${FROM_MEMORY}; Ohio buckeye (Aesculus glabra) is sold with it as buckeye and has no row of its own in the table`,
    checkedIn: { sg: null, hardness: null },
  },
  {
    commonName: 'Walnut, black',
    botanicalName: 'Juglans nigra',
    basicSg: 0.51,
    sg12: 0.55,
    sideHardnessN: 4500,
    ...fromTable('SG agrees with FIA REF_SPECIES'),
  },
  {
    commonName: 'Cherry, black',
    botanicalName: 'Prunus serotina',
    basicSg: 0.47,
    sg12: 0.5,
    sideHardnessN: 4230,
    ...fromTable(`${lbf(950)}; SG agrees with FIA REF_SPECIES`),
  },
  {
    commonName: 'Ash, white',
    botanicalName: 'Fraxinus americana',
    basicSg: 0.55,
    sg12: 0.6,
    sideHardnessN: 5900,
    ...fromTable('SG agrees with FIA REF_SPECIES'),
  },
  {
    commonName: 'Birch, yellow',
    botanicalName: 'Betula alleghaniensis',
    basicSg: 0.55,
    sg12: 0.62,
    sideHardnessN: 5600,
    ...fromTable(`${lbf(1260)}; SG agrees with FIA REF_SPECIES`),
  },
  {
    commonName: 'Birch, paper',
    botanicalName: 'Betula papyrifera',
    basicSg: 0.48,
    sg12: 0.55,
    sideHardnessN: 4000,
    source: `${HANDBOOK} (from memory)`,
    notes: FROM_MEMORY,
    checkedIn: { sg: null, hardness: null },
  },
  {
    commonName: 'Oak, northern red',
    botanicalName: 'Quercus rubra',
    basicSg: 0.56,
    sg12: 0.63,
    sideHardnessN: 5700,
    ...fromTable('SG agrees with FIA REF_SPECIES'),
  },
  { commonName: 'Oak, white', botanicalName: 'Quercus alba', basicSg: 0.6, sg12: 0.68, sideHardnessN: 6050, ...fromTable(`${lbf(1360)}; ${hardnessRecalled}`) },
  {
    commonName: 'Yellow-poplar',
    botanicalName: 'Liriodendron tulipifera',
    basicSg: 0.4,
    sg12: 0.42,
    sideHardnessN: 2400,
    ...fromTable('sold as poplar; SG agrees with FIA REF_SPECIES'),
  },
  { commonName: 'Alder, red', botanicalName: 'Alnus rubra', basicSg: 0.37, sg12: 0.41, sideHardnessN: 2600, ...fromTable('SG agrees with FIA REF_SPECIES') },
  {
    commonName: 'Basswood, American',
    botanicalName: 'Tilia americana',
    basicSg: 0.32,
    sg12: 0.37,
    sideHardnessN: 1800,
    ...fromTable('SG agrees with FIA REF_SPECIES'),
  },
  {
    commonName: 'Aspen, quaking',
    botanicalName: 'Populus tremuloides',
    basicSg: 0.35,
    sg12: 0.38,
    sideHardnessN: 1560,
    ...fromTable(`${lbf(350)}; ${hardnessRecalled}`),
  },
  {
    commonName: 'Cottonwood, eastern',
    botanicalName: 'Populus deltoides',
    basicSg: 0.37,
    sg12: 0.4,
    sideHardnessN: 1900,
    source: `${HANDBOOK} (from memory)`,
    notes: FROM_MEMORY,
    checkedIn: { sg: null, hardness: null },
  },
  {
    commonName: 'Sweetgum',
    botanicalName: 'Liquidambar styraciflua',
    basicSg: 0.46,
    sg12: 0.52,
    sideHardnessN: 3800,
    source: `${HANDBOOK} (from memory)`,
    notes: FROM_MEMORY,
    checkedIn: { sg: null, hardness: null },
  },
  {
    commonName: 'Hackberry',
    botanicalName: 'Celtis occidentalis',
    basicSg: 0.49,
    sg12: 0.53,
    sideHardnessN: 3900,
    source: `${HANDBOOK} (from memory)`,
    notes: FROM_MEMORY,
    checkedIn: { sg: null, hardness: null },
  },
  {
    commonName: 'Pine, eastern white',
    botanicalName: 'Pinus strobus',
    basicSg: 0.34,
    sg12: 0.35,
    sideHardnessN: 1690,
    ...fromTable(`${lbf(380)}; ${hardnessRecalled}`),
  },
  {
    commonName: 'Pine, ponderosa',
    botanicalName: 'Pinus ponderosa',
    basicSg: 0.38,
    sg12: 0.4,
    sideHardnessN: 2000,
    ...fromTable('read in a copy of the table itself'),
  },
  {
    commonName: 'Pine, sugar',
    botanicalName: 'Pinus lambertiana',
    basicSg: 0.34,
    sg12: 0.36,
    sideHardnessN: 1700,
    ...fromTable('read in a copy of the table itself'),
  },
  {
    commonName: 'Pine, red',
    botanicalName: 'Pinus resinosa',
    basicSg: 0.41,
    sg12: 0.46,
    sideHardnessN: 2500,
    ...fromTable('read in a copy of the table itself'),
  },
  {
    commonName: 'Redwood, old-growth',
    botanicalName: 'Sequoia sempervirens',
    basicSg: 0.38,
    sg12: 0.4,
    sideHardnessN: 2140,
    ...fromTable(`${lbf(480)}; FIA REF_SPECIES gives 0.36/0.38 for redwood, a mix of old and second growth`),
  },
  {
    commonName: 'Redwood, second-growth',
    botanicalName: 'Sequoia sempervirens',
    basicSg: 0.34,
    sg12: 0.35,
    sideHardnessN: 1900,
    source: `${HANDBOOK} (from memory)`,
    notes: `${FROM_MEMORY}; the table's young-growth row`,
    checkedIn: { sg: null, hardness: null },
  },
];
