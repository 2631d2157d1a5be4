/**
 * Ground calibration uses radioactive sources and high-voltage X-ray generators; pages that write
 * about them carry the usual cautions. This decides when text mentions lab sources.
 */
const LAB_SOURCE = /ground[- ]calibration|radioactiv|x-ray (generator|tube)|\b(55|⁵⁵)\s?fe\b|fluorescence target|lab(oratory)? source|source handling/i;

export const mentionsLabSources = (text: string): boolean => LAB_SOURCE.test(text);

export const SAFETY_TEXT =
  'Ground calibration uses sealed radioactive X-ray sources and high-voltage X-ray generators. ' +
  'Follow your local radiation-protection rules and the instructions of your radiation-protection officer; ' +
  'sources and generators are handled only by trained and authorised staff.';
