// Eleventy configuration of the report site: every filter the templates use, the assets copied
// beside the pages, and the template formats. The site data comes through the data cascade
// (templates/_data/site.js), so Eleventy's own command line builds the site from a results file:
//
//   npm run build   # once: compiles src/ to dist/, which this file and the data file import
//   MYOFOLIO_RESULTS=_site/downloads/results.json npx @11ty/eleventy --config=.eleventy.js --input=templates --output=out
//
// Folders (input/output) are passed by the command line or by src/site/build-site.ts and
// deliberately not set here: in script mode a dir returned from this file would override theirs.
// Permalinks come from one definition, PATHS in src/site/paths.ts (site.paths in the templates).
import { fileURLToPath } from 'node:url';
import { FILTERS } from './dist/site/filters.js';

const assets = fileURLToPath(new URL('./templates/assets/', import.meta.url));

export default function (cfg) {
  cfg.setNunjucksEnvironmentOptions({ autoescape: true, throwOnUndefined: false, trimBlocks: true, lstripBlocks: true });
  cfg.addFilter('jsonScript', FILTERS.jsonScript);
  cfg.addFilter('cssString', FILTERS.cssString);
  cfg.addFilter('inlineAsset', FILTERS.inlineAsset);
  // On Nunjucks itself: a filter added by addFilter is timed by Eleventy, which prints a warning
  // when one takes more than 8% of a run, as this one (a row per variant) can on a large study.
  cfg.amendLibrary('njk', (env) => env.addFilter('dataRows', FILTERS.dataRows));
  cfg.addPassthroughCopy({ [assets]: 'assets' });
  cfg.setQuietMode(true);
  cfg.setUseGitIgnore(false);
  return {
    templateFormats: ['njk'],
    htmlTemplateEngine: 'njk',
  };
}
