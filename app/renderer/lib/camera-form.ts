/**
 * The camera fields as the user types them ("200 kV", "0.8 m", "28 µm") to the camera
 * core wants, with the same unit parser as the command line (app/common/quantity).
 */
import { cameraLengthPxFromPhysical, electronWavelengthA } from '../../../core/physics';
import type { AnalysisCamera } from '../../../core/pipeline';
import { parseQuantity, QuantityError } from '../../common/quantity';
import type { CameraText } from '../../handlers/contract';

export type FieldResult<T> = { ok: true; value: T } | { ok: false; message: string };

function read(text: string, dimension: 'voltage' | 'length', label: string): FieldResult<number> {
  try {
    return { ok: true, value: parseQuantity(text, dimension, label) };
  } catch (e) {
    return { ok: false, message: e instanceof QuantityError ? e.message : String(e) };
  }
}

export const readVoltage = (text: string): FieldResult<number> => read(text, 'voltage', 'voltage');
export const readLength = (text: string, label: string): FieldResult<number> => read(text, 'length', label);

/** Relativistic electron wavelength for the typed voltage (core/physics, CODATA 2018), or the field's error. */
export function wavelengthOf(voltageText: string): FieldResult<number> {
  const v = readVoltage(voltageText);
  return v.ok ? { ok: true, value: electronWavelengthA(v.value) } : v;
}

/** A nominal camera from the three fields; errors name the field. */
export function nominalCamera(text: CameraText): FieldResult<AnalysisCamera> {
  const v = readVoltage(text.voltage);
  if (!v.ok) return v;
  const l = readLength(text.cameraLength, 'camera length');
  if (!l.ok) return l;
  const p = readLength(text.pixelSize, 'pixel size');
  if (!p.ok) return p;
  return {
    ok: true,
    value: {
      voltageV: v.value,
      cameraLengthPx: cameraLengthPxFromPhysical(l.value, p.value),
      cameraLengthSigmaPx: 0,
      source: `nominal: camera length ${text.cameraLength.trim()}, pixel ${text.pixelSize.trim()}`,
      calibrated: false,
    },
  };
}
