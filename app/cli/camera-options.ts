/**
 * The camera description shared by every command that turns radii into d or
 * d into radii: a voltage plus either camera length and pixel pitch, or the
 * reciprocal scale per pixel written by camera software.
 */
import type { Command } from 'commander';
import {
  cameraLengthPxFromPhysical,
  cameraLengthPxFromReciprocalScale,
  electronWavelengthA,
} from '../../core/physics';
import { parseQuantity } from '../common/quantity';
import { UsageError } from './exit-codes';

export interface CameraFlags {
  voltage?: string;
  cameraLength?: string;
  pixelSize?: string;
  scale?: string;
}

export interface CameraSettings {
  voltageV: number;
  wavelengthA: number;
  /** Camera length over pixel pitch, or null when no camera was described. */
  cameraLengthPx: number | null;
  /** How the camera was described, for reports. */
  described: { cameraLengthM: number; pixelSizeM: number } | { scalePerNmPerPx: number } | null;
}

/** Adds --voltage, --camera-length, --pixel-size and --scale to a command. */
export function addCameraOptions(command: Command, cameraRequired: boolean): Command {
  return command
    .option('--voltage <value>', 'accelerating voltage with its unit, e.g. 200kV (required)')
    .option('--camera-length <value>', `camera length with its unit, e.g. 1.2m or 850mm (with --pixel-size)${cameraRequired ? '' : '; optional'}`)
    .option('--pixel-size <value>', 'detector pixel pitch with its unit, binning included, e.g. 14um')
    .option('--scale <value>', 'reciprocal scale per pixel at the pattern centre, e.g. 0.0123/nm (instead of camera length and pixel size)');
}

/** Reads the camera flags; throws UsageError for incomplete or conflicting descriptions. */
export function readCameraFlags(flags: CameraFlags, cameraRequired: boolean): CameraSettings {
  if (flags.voltage === undefined) throw new UsageError('give the accelerating voltage, e.g. --voltage 200kV');
  const voltageV = parseQuantity(flags.voltage, 'voltage', '--voltage');
  const wavelengthA = electronWavelengthA(voltageV);
  const physical = flags.cameraLength !== undefined || flags.pixelSize !== undefined;
  if (physical && flags.scale !== undefined) {
    throw new UsageError('give either --camera-length with --pixel-size, or --scale, not both');
  }
  if (physical) {
    if (flags.cameraLength === undefined) throw new UsageError('--pixel-size needs --camera-length too (e.g. --camera-length 1.2m)');
    if (flags.pixelSize === undefined) throw new UsageError('--camera-length needs --pixel-size too (the detector pixel pitch, e.g. --pixel-size 14um)');
    const cameraLengthM = parseQuantity(flags.cameraLength, 'length', '--camera-length');
    const pixelSizeM = parseQuantity(flags.pixelSize, 'length', '--pixel-size');
    return { voltageV, wavelengthA, cameraLengthPx: cameraLengthPxFromPhysical(cameraLengthM, pixelSizeM), described: { cameraLengthM, pixelSizeM } };
  }
  if (flags.scale !== undefined) {
    // Written as 1/length per pixel; core wants 1/nm per pixel.
    const scalePerNmPerPx = parseQuantity(flags.scale, 'inverse-length', '--scale') * 1e-9;
    return { voltageV, wavelengthA, cameraLengthPx: cameraLengthPxFromReciprocalScale(scalePerNmPerPx, wavelengthA), described: { scalePerNmPerPx } };
  }
  if (cameraRequired) {
    throw new UsageError('describe the camera: --camera-length and --pixel-size (e.g. 1.2m and 14um), or --scale (e.g. 0.0123/nm)');
  }
  return { voltageV, wavelengthA, cameraLengthPx: null, described: null };
}
