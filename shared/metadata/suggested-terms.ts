/**
 * Suggestions shipped with the app for free-text fields that most depositors fill with one of a
 * few dozen values. They are offered, never enforced: any other text is accepted.
 */

/**
 * Model organisms common in localization microscopy, by scientific name, with their NCBI Taxonomy
 * ids (from memory; each is the species-level id shown on the NCBI Taxonomy browser).
 */
export const ORGANISMS: readonly { name: string; taxonId: number }[] = [
  { name: 'Homo sapiens', taxonId: 9606 },
  { name: 'Mus musculus', taxonId: 10090 },
  { name: 'Rattus norvegicus', taxonId: 10116 },
  { name: 'Chlorocebus aethiops', taxonId: 9534 },
  { name: 'Cricetulus griseus', taxonId: 10029 },
  { name: 'Canis lupus familiaris', taxonId: 9615 },
  { name: 'Sus scrofa', taxonId: 9823 },
  { name: 'Bos taurus', taxonId: 9913 },
  { name: 'Gallus gallus', taxonId: 9031 },
  { name: 'Xenopus laevis', taxonId: 8355 },
  { name: 'Danio rerio', taxonId: 7955 },
  { name: 'Drosophila melanogaster', taxonId: 7227 },
  { name: 'Caenorhabditis elegans', taxonId: 6239 },
  { name: 'Saccharomyces cerevisiae', taxonId: 4932 },
  { name: 'Schizosaccharomyces pombe', taxonId: 4896 },
  { name: 'Dictyostelium discoideum', taxonId: 44689 },
  { name: 'Chlamydomonas reinhardtii', taxonId: 3055 },
  { name: 'Arabidopsis thaliana', taxonId: 3702 },
  { name: 'Escherichia coli', taxonId: 562 },
  { name: 'Bacillus subtilis', taxonId: 1423 },
]

/**
 * Fluorophores used for single-molecule switching and blinking, by generic (chemical or published
 * protein) name; no product or brand names. Common practice in the SMLM literature.
 */
export const FLUOROPHORES: readonly string[] = [
  // Organic dyes
  'Cyanine 5',
  'Cyanine 5.5',
  'Cyanine 7',
  'Cyanine 3B',
  'Cyanine 3',
  'Tetramethylrhodamine (TMR)',
  'Rhodamine 6G',
  'Silicon rhodamine (SiR)',
  'Hydroxymethyl silicon rhodamine (HMSiR)',
  'Carbopyronine',
  'Oxazine',
  'Fluorescein',
  'Nile red',
  // Photoactivatable, photoconvertible and photoswitchable fluorescent proteins
  'mEos2',
  'mEos3.2',
  'mEos4b',
  'tdEosFP',
  'Dendra2',
  'mMaple3',
  'mGeos-M',
  'PA-GFP',
  'PA-mCherry1',
  'PAmKate',
  'Dronpa',
  'rsEGFP2',
  'Skylan-S',
  'mIrisFP',
  // Fluorescent proteins imaged by blinking or as references
  'EGFP',
  'mNeonGreen',
  'mCherry',
  'mScarlet',
]

/** The suggestion lists by field (paths with `*` for any list entry, as the form keys them). */
export const SHIPPED_SUGGESTIONS: Readonly<Record<string, readonly string[]>> = {
  'biosample.organism.name': ORGANISMS.map((o) => o.name),
  'labelling.*.label': FLUOROPHORES,
}

/** The NCBI Taxonomy id of a listed organism (exact scientific name, any case), else null. */
export function taxonIdOf(name: string): number | null {
  const wanted = name.trim().toLowerCase()
  return ORGANISMS.find((o) => o.name.toLowerCase() === wanted)?.taxonId ?? null
}
