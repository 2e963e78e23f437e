import { createHash } from 'node:crypto';
import { existsSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { UserError } from '../core/errors.js';
import { version } from '../core/version.js';
import { writeFolderAtomic } from '../io/atomic.js';
import type { Classifier } from './classifier.js';
import { classifierFromJSON } from './models.js';

/**
 * A saved model is a folder: `manifest.json` plus the files it lists. The manifest records the folder
 * format, the landform version that wrote it, whatever the caller adds (options, learned grid, classes,
 * seed), every file's size and SHA-256, and an overall checksum: the SHA-256 of the manifest itself
 * (keys sorted, without the `checksum` field). Loading verifies all of it, so an altered, truncated,
 * incomplete or foreign folder is refused with a one-line message naming the file.
 */
export const MODEL_FOLDER_FORMAT = 1;
export const MANIFEST_NAME = 'manifest.json';
const KIND = 'landform.model-folder';

export interface ModelFolderManifest extends Record<string, unknown> {
  kind: typeof KIND;
  format: number;
  landform: string;
  files: Record<string, { bytes: number; sha256: string }>;
  checksum: string;
}

/** Writes `dir` atomically (a failed save leaves no folder, an existing one is replaced only on success). */
export async function saveModelFolder(
  dir: string,
  manifest: Record<string, unknown>,
  files: Record<string, Uint8Array | string>,
): Promise<void> {
  const listed: Record<string, { bytes: number; sha256: string }> = {};
  const contents: Array<[string, Uint8Array]> = [];
  for (const [name, value] of Object.entries(files)) {
    if (!/^[A-Za-z0-9][A-Za-z0-9._-]*$/.test(name) || name === MANIFEST_NAME) {
      throw new Error(
        `saveModelFolder: '${name}' is not a plain file name (letters, digits, . _ -; not ${MANIFEST_NAME})`,
      );
    }
    const bytes = typeof value === 'string' ? Buffer.from(value, 'utf8') : value;
    listed[name] = { bytes: bytes.length, sha256: sha256(bytes) };
    contents.push([name, bytes]);
  }
  for (const reserved of ['kind', 'format', 'landform', 'files', 'checksum']) {
    if (reserved in manifest)
      throw new Error(`saveModelFolder: the manifest field '${reserved}' is set by the folder itself`);
  }
  const body: Record<string, unknown> = {
    kind: KIND,
    format: MODEL_FOLDER_FORMAT,
    landform: version(),
    ...manifest,
    files: listed,
  };
  const full = { ...body, checksum: sha256(Buffer.from(canonicalJson(body), 'utf8')) };
  await writeFolderAtomic(
    dir,
    (tmp) => {
      for (const [name, bytes] of contents) writeFileSync(join(tmp, name), bytes);
      writeFileSync(join(tmp, MANIFEST_NAME), `${JSON.stringify(full, null, 2)}\n`);
    },
    { command: 'model' },
  );
}

/**
 * The names a model folder written before folders carried landform's marker holds: its manifest and the
 * files the manifest lists (empty when `dir` holds no readable model manifest). Used to recognise such a
 * folder as landform's own when it is about to be replaced.
 */
export function savedModelNames(dir: string): string[] {
  try {
    const m = JSON.parse(readFileSync(join(dir, MANIFEST_NAME), 'utf8')) as Partial<ModelFolderManifest>;
    if (m?.kind !== KIND || typeof m.files !== 'object' || m.files === null) return [];
    return [MANIFEST_NAME, ...Object.keys(m.files)];
  } catch {
    return [];
  }
}

/** Reads and verifies a model folder; any problem is a UserError naming the file and what to do. */
export async function loadModelFolder(
  dir: string,
): Promise<{ manifest: ModelFolderManifest; files: Record<string, Uint8Array> }> {
  const again = 'train the model again and save it with --save';
  if (!existsSync(dir) || !statSync(dir).isDirectory())
    throw new UserError(`no model folder here: give the folder written by 'landform train … --save'`, {
      file: dir,
    });
  const manifestPath = join(dir, MANIFEST_NAME);
  if (!existsSync(manifestPath))
    throw new UserError(
      `not a model folder (${MANIFEST_NAME} is missing): give the folder written by 'landform train … --save'`,
      { file: manifestPath },
    );
  let parsed: unknown;
  try {
    parsed = JSON.parse(readFileSync(manifestPath, 'utf8'));
  } catch (error) {
    throw new UserError(`the manifest is not valid JSON (${(error as Error).message}); ${again}`, {
      file: manifestPath,
    });
  }
  const m = parsed as Partial<ModelFolderManifest> | null;
  if (!m || typeof m !== 'object' || m.kind !== KIND)
    throw new UserError(`not a landform model manifest (kind tag missing or different); ${again}`, {
      file: manifestPath,
    });
  if (m.format !== MODEL_FOLDER_FORMAT) {
    throw new UserError(
      `model folder format ${String(m.format)} (written by landform ${String(m.landform)}) cannot be read by landform ${version()}, which reads format ${MODEL_FOLDER_FORMAT}: use that version, or ${again}`,
      { file: manifestPath },
    );
  }
  const { checksum, ...body } = m as ModelFolderManifest;
  if (typeof checksum !== 'string' || checksum !== sha256(Buffer.from(canonicalJson(body), 'utf8'))) {
    throw new UserError(`the manifest was altered after saving (its checksum does not match); ${again}`, {
      file: manifestPath,
    });
  }
  const files: Record<string, Uint8Array> = {};
  for (const [name, entry] of Object.entries(m.files ?? {})) {
    const path = join(dir, name);
    if (!existsSync(path)) throw new UserError(`a file of the model is missing; ${again}`, { file: path });
    const bytes = readFileSync(path);
    if (bytes.length !== entry.bytes || sha256(bytes) !== entry.sha256) {
      throw new UserError(
        `the file was altered or damaged after saving (its SHA-256 does not match the manifest); ${again}`,
        { file: path },
      );
    }
    files[name] = new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  }
  return { manifest: m as ModelFolderManifest, files };
}

/** The file that holds a classifier's state inside a model folder. */
export const CLASSIFIER_FILE = 'classifier.json';

/** Saves a fitted classifier (its `toJSON()`) with the caller's manifest fields (options, grid, classes…). */
export async function saveClassifierFolder(
  dir: string,
  classifier: Classifier,
  manifest: Record<string, unknown>,
): Promise<void> {
  const state = await classifier.toJSON();
  await saveModelFolder(
    dir,
    { model: classifier.name, hyperparameters: classifier.hyperparameters, ...manifest },
    { [CLASSIFIER_FILE]: JSON.stringify(state) },
  );
}

/** Loads a folder written by `saveClassifierFolder`: the verified manifest and the rebuilt classifier. */
export async function loadClassifierFolder(
  dir: string,
): Promise<{ manifest: ModelFolderManifest; classifier: Classifier }> {
  const { manifest, files } = await loadModelFolder(dir);
  const bytes = files[CLASSIFIER_FILE];
  if (!bytes)
    throw new UserError(
      `the model folder lists no ${CLASSIFIER_FILE}: give a folder written by 'landform train … --save'`,
      { file: join(dir, MANIFEST_NAME) },
    );
  const classifier = await classifierFromJSON(JSON.parse(Buffer.from(bytes).toString('utf8')));
  return { manifest, classifier };
}

function sha256(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** JSON with object keys sorted at every level, so the checksum does not depend on key order. */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') return JSON.stringify(value) ?? 'null';
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
}
