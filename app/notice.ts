/** Shown by the app, the command line and the README alike. */
export const RESEARCH_NOTICE =
  'Veil is research software for reader studies. It is not a medical device and must not be used for diagnosis. ' +
  'Verify de-identification yourself before any data leaves your site, and follow your ethics board and local privacy law.';

export const VEIL_VERSION = '0.1.0';
