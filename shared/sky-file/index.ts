/** Sky file: schema (zod) shared with the server, and its resolution into a built sky. */
export {
  skyFileSchema,
  siteSchema,
  sunSchema,
  parseSkyFile,
  formatSkyFileIssues,
  type SkyFile,
  type SkyFileInput,
} from './sky-file-schema';
export { resolveSkyFile, skyFromFile, type ResolvedSky } from './sky-from-file';
