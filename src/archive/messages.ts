/**
 * Every message about an archive (archive.json, releases), in one catalogue. Each entry returns
 * the severity, a stable code, what is wrong (one sentence) and how to fix it (one sentence);
 * the caller adds the location with `issue` (src/study/messages.ts), as for study input.
 */
import type { MessageText } from '../study/messages.js';

const e = (code: string, message: string, fix: string): MessageText => ({ severity: 'error', code, message, fix });
const w = (code: string, message: string, fix: string): MessageText => ({ severity: 'warning', code, message, fix });
const list = (xs: readonly string[]) => xs.map((x) => `'${x}'`).join(', ');

export const ARCHIVE_MSG = {
  // ---- archive.json: syntax and schema ----
  notJson: (reason: string) => e('archive.not-json', `The archive manifest is not valid JSON: ${reason}.`, 'Fix the JSON syntax (a JSON validator or editor shows the spot).'),
  duplicateKey: (key: string, firstLine: number, firstCol: number) =>
    e('archive.duplicate-key', `The field '${key}' is given twice in the same object (first on line ${firstLine}, column ${firstCol}); JSON readers keep only one of the two.`, `Keep one '${key}' and remove the other.`),
  required: (prop: string) => e('archive.required', `The required field '${prop}' is missing.`, `Add '${prop}' here (see schemas/archive.schema.json).`),
  unknownField: (prop: string, known: readonly string[]) => e('archive.unknown-field', `'${prop}' is not an archive manifest field here.`, `Remove it or correct its spelling; the fields here are ${list(known)}.`),
  type: (expected: string) => e('archive.type', `The value must be of type ${expected}.`, `Write ${/^[aeiou]/.test(expected) ? 'an' : 'a'} ${expected} here.`),
  nonEmpty: () => e('archive.range', 'The text is empty.', 'Write some text here.'),
  noStudies: () => e('archive.no-studies', 'The archive lists no studies.', 'Add at least one { "id": …, "path": … } entry to studies.'),
  tooLong: (limit: number) => e('archive.range', `The value is longer than ${limit} characters.`, `Shorten it to at most ${limit} characters.`),
  studyIdForm: (id: string) =>
    e('archive.study-id', `'${id}' is not a study id: ids are lower-case letters and digits joined by single hyphens.`, `Write it as, e.g., '${suggestSlug(id)}'.`),
  schemaOther: (text: string) => e('archive.schema', `The value breaks the archive schema: ${text}.`, 'Correct the value; see schemas/archive.schema.json.'),

  // ---- archive.json: what the schema cannot check ----
  duplicateId: (id: string, firstIndex: number) => e('archive.duplicate-id', `The study id '${id}' is already used by /studies/${firstIndex}.`, 'Give each study its own id.'),
  duplicatePath: (path: string, firstIndex: number) => e('archive.duplicate-path', `The folder '${path}' is already listed as /studies/${firstIndex}.`, 'List each study folder once.'),
  pathCaseClash: (path: string, other: string, firstIndex: number) =>
    e('archive.path-case', `The folder '${path}' differs from '${other}' (/studies/${firstIndex}) only in upper and lower case, which is one folder on macOS and Windows.`, 'Rename one of the two folders so that the names differ in more than case.'),
  pathParent: (path: string) => e('archive.path-outside', `The path '${path}' uses '..' and may leave the archive folder.`, 'Move the study folder into the archive folder and give its path from there, without "..".'),
  pathAbsolute: (path: string) => e('archive.path-absolute', `The path '${path}' is absolute (or starts at a home folder), so the archive would not work on another machine.`, 'Move the study folder into the archive folder and give its path relative to archive.json, e.g. studies/panel-2025.'),
  pathBackslash: (path: string) => e('archive.path-backslash', `The path '${path}' contains a backslash.`, 'Separate folders with forward slashes (/), also on Windows.'),
  pathIsArchive: (path: string) => e('archive.path-is-archive', `The path '${path}' is the archive folder itself.`, 'Put each study in a folder of its own inside the archive folder and give that folder.'),
  pathReserved: (path: string, reserved: string) =>
    e('archive.path-reserved', `The path '${path}' lies in '${reserved}/', where the archive keeps its releases.`, `Move the study folder out of '${reserved}/' and give its new path.`),
  nestedStudy: (path: string, outer: string, outerIndex: number) =>
    w('archive.nested-study', `The study folder '${path}' lies inside the study folder '${outer}' (/studies/${outerIndex}).`, 'Place study folders side by side, so that each holds one study only.'),

  // ---- archive folder ----
  unreadable: (file: string, reason: string) => e('archive.unreadable', `'${file}' cannot be read: ${reason}.`, 'Check that the file exists and that you may read it.'),
  studyMissing: (path: string) => e('archive.study-missing', `The study folder '${path}' does not exist in the archive folder.`, 'Correct the path in archive.json, or move the study folder there.'),
  studyNoManifest: (path: string, manifest: string) =>
    e('archive.study-no-manifest', `The study folder '${path}' has no ${manifest}.`, `Give the path of a study folder (one with ${manifest}); 'myofolio init <dir>' writes a starter study.`),

  // ---- releasing a built study ----
  releaseUnknownStudy: (id: string, ids: readonly string[]) => e('release.unknown-study', `The archive has no study '${id}'.`, `Use one of the ids in archive.json: ${list(ids)}.`),
  releaseNotBuilt: (id: string, out: string) =>
    e('release.not-built', `Study '${id}' has no built results in '${out}'.`, `Build the archive first (myofolio build <archive-dir> --out ${out}), check its pages, then release.`),
  releaseStaleBuild: (id: string, out: string) =>
    e('release.stale-build', `The files of study '${id}' (or its release history, or the tool) changed since the archive in '${out}' was built, so its built results are not what its files now say.`, `Build the archive again (myofolio build <archive-dir> --out ${out}), check the pages, then release.`),

  // ---- releases ----
  releaseStudyId: (id: string) => e('release.study-id', `'${id}' is not a study id of the form the archive uses.`, 'Use the id given to the study in archive.json (lower-case letters, digits, single hyphens).'),
  releaseDate: (date: string) => e('release.date', `'${date}' is not a calendar date written as YYYY-MM-DD.`, 'Give the release date as YYYY-MM-DD, e.g. 2026-03-02.'),
  releaseNote: () => e('release.note', 'The release has no note.', 'Say with whom or why the results are shared, e.g. "sent to the cardiogenetics clinic".'),
  releaseCaveat: () => e('release.caveat', 'A caveat of the release is empty.', 'Remove the empty caveat or write its text.'),
  releaseNotResults: (reason: string) => e('release.not-results', `This is not a myofolio results.json: ${reason}.`, 'Release the results.json written by `myofolio build` for this study, unchanged.'),
  releaseResultsSchema: (text: string) => e('release.results-schema', `The results break schemas/results.schema.json: ${text}.`, 'Rebuild the study with `myofolio build` and release the results.json it writes, unchanged.'),
  releaseExists: (folder: string) =>
    e('release.exists', `The release folder '${folder}' exists already; a release is written once and never replaced.`, 'Make a new release (it gets the next number of the day); the existing one stays as it was released.'),
  recordNotJson: (reason: string) => e('release.record-not-json', `The release record is not valid JSON: ${reason}.`, 'Restore release.json from a backup: release records are written once by `myofolio release` and never edited.'),
  recordField: (what: string) => e('release.record-field', `The release record is damaged: ${what}.`, 'Restore release.json from a backup: release records are written once by `myofolio release` and never edited.'),
  recordFolderMismatch: (folder: string, study: string, id: string) =>
    e('release.record-folder', `The release record in '${folder}' names release '${id}' of study '${study}', which belongs in another folder.`, 'Restore the release folder from a backup; release folders are never renamed or moved.'),
  releaseMissingFile: (file: string) => e('release.missing-file', `The release lacks '${file}'.`, 'Restore the release folder from a backup; a release is complete when written and never edited.'),
  releaseHashMismatch: (recorded: string, found: string) =>
    e('release.hash-mismatch', `The released results.json no longer has the SHA-256 recorded when it was released (recorded ${recorded.slice(0, 12)}…, found ${found.slice(0, 12)}…): it was altered after release.`, 'Restore results.json of this release from a backup; released results are never edited (make a new release instead).'),
  releaseUnreadable: (file: string, reason: string) => e('release.unreadable', `'${file}' cannot be read: ${reason}.`, 'Check that the file exists and that you may read it.'),
  releaseWriteFailed: (folder: string, reason: string) =>
    e('release.write-failed', `The release '${folder}' could not be written: ${reason}. Nothing was released.`, 'Check that the archive folder exists, that you may write in it and that the disk has room, then release again.'),
  releaseStrayFolder: (folder: string) =>
    w('release.stray-folder', `'${folder}' is not a release folder (release folders are named <yyyy-mm-dd>-<n>); it is ignored.`, 'Move it out of the releases folder; only `myofolio release` writes there.'),
  releaseIncomplete: (folder: string) =>
    w('release.incomplete', `'${folder}' is an unfinished release (the release was interrupted before it was complete); it is not a release.`, 'Remove the folder after checking that no release is running.'),
} as const;

/** A slug suggestion for a mistyped id: lower case, runs of other characters to one hyphen. */
function suggestSlug(text: string): string {
  const s = text
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '');
  return s || 'study-1';
}
