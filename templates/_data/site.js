// The site data (`site` in every template), through Eleventy's data cascade.
//
// The build (src/site/build-site.ts) gives `site` itself as global data, one run of variant pages
// at a time, and this file then gives way to it. Run by Eleventy's own command line, it builds
// `site` from the results file named by MYOFOLIO_RESULTS (src/site/site-data.ts, compiled to dist/):
//
//   MYOFOLIO_RESULTS=_site/downloads/results.json npx @11ty/eleventy --config=.eleventy.js --input=templates --output=out
export default async function site(configData) {
  if (configData && configData.site !== undefined) return undefined;
  const file = process.env.MYOFOLIO_RESULTS;
  if (!file) {
    throw new Error('templates/_data/site.js: set MYOFOLIO_RESULTS to the path of a results.json (e.g. _site/downloads/results.json) to build the site with Eleventy directly.');
  }
  const epoch = process.env.SOURCE_DATE_EPOCH;
  const { siteFromResultsFile } = await import('../../dist/site/site-data.js');
  return siteFromResultsFile(file, epoch !== undefined && epoch !== '' ? { sourceDateEpoch: Number(epoch) } : {});
}
