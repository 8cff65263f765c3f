import type { AssetClass } from '@/db/schema';

/**
 * The names of the asset classes a segment can have (the supervisory benchmark it is compared
 * with: BCBS 2006 paras 272-273 and 328-330), in the one place every screen takes them from.
 */

/** On forms, in tables and lists. */
export const assetClassLabels: Record<AssetClass, string> = {
  corporate: 'Corporate',
  'sme-corporate': 'SME corporate (with turnover)',
  'residential-mortgage': 'Residential mortgage',
  'qualifying-revolving': 'Qualifying revolving retail',
  'other-retail': 'Other retail',
  none: 'None (no supervisory benchmark)',
};

/** Inside a sentence ("the supervisory correlation for residential mortgage"). */
export const assetClassNames: Record<AssetClass, string> = {
  corporate: 'corporate',
  'sme-corporate': 'SME corporate',
  'residential-mortgage': 'residential mortgage',
  'qualifying-revolving': 'qualifying revolving retail',
  'other-retail': 'other retail',
  none: 'no asset class',
};
