// Eleventy configuration of the report site. Folders (input/output) are passed by
// src/site/build-site.ts and deliberately not set here: in script mode a dir returned
// from this file would override the constructor's folders.

/** JSON for a <script type="application/json"> block: '<' becomes \u003c so '</script>' cannot close it. */
function jsonScript(value) {
  return JSON.stringify(value ?? null)
    .replace(/</g, '\\u003c')
    .replace(/\u2028/g, '\\u2028')
    .replace(/\u2029/g, '\\u2029');
}

export default function (cfg) {
  cfg.setNunjucksEnvironmentOptions({ autoescape: true, throwOnUndefined: false, trimBlocks: true, lstripBlocks: true });
  cfg.addFilter('jsonScript', jsonScript);
  cfg.setQuietMode(true);
  cfg.setUseGitIgnore(false);
  return {
    templateFormats: ['njk'],
    htmlTemplateEngine: 'njk',
  };
}
