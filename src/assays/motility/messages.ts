/**
 * The motility assay's messages, in one place: every flag code its analysis can raise, in plain
 * words (the glossary page), and the message of each flag (what happened to one preparation, with
 * its numbers); the problems only its input kinds can have.
 */
import type { MessageText, SourceRef } from '../../results/source.js';
import type { FlagOf, FlagWords } from '../types.js';

export const MOTILITY_FLAG_WORDS = {
  'motility-short-tracks': {
    label: 'short filament tracks left out',
    explanation: 'Some filament tracks had too few frames to give a velocity and were left out; the other filaments of the preparation were used.',
    levels: ['unit'],
  },
  'motility-duplicate-frames': {
    label: 'repeated frame times',
    explanation: 'Some track rows repeat the time of an earlier frame of the same filament; the first row was kept and the repeats ignored.',
    levels: ['unit'],
  },
  'motility-both-inputs': {
    label: 'tracks and velocities both given',
    explanation:
      'The preparation has both centroid tracks and ready-made velocities; velocities computed from the tracks were used and the velocity rows ignored. Nothing is wrong with the result.',
    levels: ['unit'],
  },
  'motility-invalid-velocity': {
    label: 'invalid velocities left out',
    explanation: 'Some filament velocities were negative or not numbers and were left out.',
    levels: ['unit'],
  },
  'motility-too-few-filaments': {
    label: 'few filaments',
    explanation: 'Fewer filaments were analysed than recommended for one preparation, so its velocity is less certain.',
    levels: ['unit'],
  },
  'motility-no-moving-filaments': {
    label: 'no moving filaments',
    explanation: 'No filament moved faster than the immobility threshold, so the preparation gives no velocity.',
    levels: ['unit'],
  },
  'motility-high-immobile-fraction': {
    label: 'many immobile filaments',
    explanation:
      'More filaments were immobile than the limit set for a sound preparation, which often means damaged (dead) heads; the preparation should be checked.',
    levels: ['unit'],
  },
} satisfies Record<string, FlagWords>;

/** A flag the motility assay raises. */
export type MotilityFlag = FlagOf<keyof typeof MOTILITY_FLAG_WORDS>;

export const MOTILITY_MSG = {
  shortTracks: (tracks: number, minFrames: number, at: SourceRef | undefined): MotilityFlag => ({
    code: 'motility-short-tracks',
    severity: 'info',
    message: `${tracks} track(s) with fewer than ${minFrames} frames gave no velocity and were left out.`,
    at,
  }),
  duplicateFrames: (rows: number, at: SourceRef): MotilityFlag => ({
    code: 'motility-duplicate-frames',
    severity: 'warning',
    message: `${rows} track row(s) repeat the time of an earlier frame of the same filament; the first was kept.`,
    at,
  }),
  bothInputs: (velocityRows: number, at: SourceRef): MotilityFlag => ({
    code: 'motility-both-inputs',
    severity: 'info',
    message: `This preparation has both centroid tracks and ${velocityRows} velocity row(s); the velocities from tracks were used and the velocity rows ignored.`,
    at,
  }),
  invalidVelocity: (values: number, at: SourceRef | undefined): MotilityFlag => ({
    code: 'motility-invalid-velocity',
    severity: 'warning',
    message: `${values} filament velocity value(s) are negative or not numbers and were left out.`,
    at,
  }),
  tooFewFilaments: (filaments: number, minFilaments: number, at: SourceRef): MotilityFlag => ({
    code: 'motility-too-few-filaments',
    severity: 'warning',
    message: `Only ${filaments} filament(s) analysed (at least ${minFilaments} recommended per preparation).`,
    at,
  }),
  noMovingFilaments: (immobileUmS: number, at: SourceRef): MotilityFlag => ({
    code: 'motility-no-moving-filaments',
    severity: 'warning',
    message: `No filament moved at or above ${immobileUmS} µm/s; velocity is not estimable for this preparation.`,
    at,
  }),
  highImmobileFraction: (fractionImmobile: number, maxImmobileFraction: number, at: SourceRef): MotilityFlag => ({
    code: 'motility-high-immobile-fraction',
    severity: 'warning',
    message: `${(fractionImmobile * 100).toFixed(1)}% of filaments are immobile (above ${maxImmobileFraction * 100}%): check the preparation for dead heads.`,
    at,
  }),
};

/** Input problems only the motility input kinds can have. */
export const MOTILITY_INPUT_MSG = {
  needsFrameInterval: (): MessageText => ({
    severity: 'error',
    code: 'csv.needs-frame-interval',
    message: 'Tracks are given by frame but the manifest gives no frameInterval for this file.',
    fix: 'Add "frameInterval": {"value": …, "unit": "s"} to the file entry, or give a time column.',
  }),
};
