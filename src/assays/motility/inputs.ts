/**
 * The motility assay's input kinds: per-filament velocities measured elsewhere
 * (motility-velocities), or per-frame centroid tracks (motility-tracks), turned into one
 * velocity per filament by tracks.ts.
 */
import type { InputKindDef, RowBase } from '../types.js';
import { MOTILITY_INPUT_MSG } from './messages.js';
import tracksSchema from './motility-tracks.schema.json' with { type: 'json' };
import velocitiesSchema from './motility-velocities.schema.json' with { type: 'json' };

/** Motility: one filament's velocity measured elsewhere. */
export interface VelocityRow extends RowBase {
  movie?: string;
  filament: string;
  velocityUmS: number;
}

/** Motility: one centroid position of one filament in one frame (positions in µm). */
export interface TrackRow extends RowBase {
  movie: string;
  filament: string;
  timeS: number;
  xUm: number;
  yUm: number;
}

export const MOTILITY_VELOCITIES: InputKindDef<VelocityRow> = {
  kind: 'motility-velocities',
  schema: velocitiesSchema,
};

export const MOTILITY_TRACKS: InputKindDef<TrackRow> = {
  kind: 'motility-tracks',
  schema: tracksSchema,
  fileOptions: [
    {
      name: 'pixelSize',
      shape: 'quantity',
      quantity: 'length',
      description: 'Tracks: size of one pixel, e.g. {"value": 0.16, "unit": "um"}.',
      setting: 'pixelSizeUm',
    },
    {
      name: 'frameInterval',
      shape: 'quantity',
      quantity: 'time',
      description: 'Tracks: time between frames, e.g. {"value": 0.2, "unit": "s"}.',
      setting: 'frameIntervalS',
    },
  ],
  templateSkip: ['frame'],
  // Tracks keep the time of a frame, not its number.
  transientFields: ['frame'],
  reading(file) {
    const frameIntervalS = file.options.frameInterval as number | undefined;
    return {
      headerProblems: file.has('frame') && !file.has('time') && frameIntervalS === undefined ? [MOTILITY_INPUT_MSG.needsFrameInterval()] : [],
      complete(row, cell) {
        if (row.timeS === undefined) row.timeS = (cell('frame') as number) * frameIntervalS!;
        return true;
      },
    };
  },
};
