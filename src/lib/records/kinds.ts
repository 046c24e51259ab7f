/** The vocabulary of commissioning and maintenance records. */

export const SEAL_POSITIONS = ['aft', 'forward', 'other'] as const;
export type SealPosition = (typeof SEAL_POSITIONS)[number];
export const SEAL_LABELS: Record<SealPosition, string> = {
	aft: 'Aft seal',
	forward: 'Forward seal',
	other: 'Other'
};

export const BEARING_STATIONS = ['aft', 'forward', 'other'] as const;
export type BearingStation = (typeof BEARING_STATIONS)[number];
export const BEARING_LABELS: Record<BearingStation, string> = {
	aft: 'Aft bearing',
	forward: 'Forward bearing',
	other: 'Other'
};

export const WEAR_METHODS = ['poker_gauge', 'sensor', 'feeler', 'other'] as const;
export type WearMethod = (typeof WEAR_METHODS)[number];
export const WEAR_METHOD_LABELS: Record<WearMethod, string> = {
	poker_gauge: 'Poker gauge',
	sensor: 'Wear-down sensor',
	feeler: 'Feeler gauge',
	other: 'Other'
};

/** The record collections of a shaft, as the API names them (…/records/{kind}). */
export const RECORD_KINDS = [
	'seal-tests',
	'bearing-measurements',
	'wear',
	'shrink-fits',
	'attachments'
] as const;
export type RecordKind = (typeof RECORD_KINDS)[number];

/** Photos and documents beside the records: what the bytes must be. */
export const ATTACHMENT_TYPES = {
	'image/jpeg': { ext: ['.jpg', '.jpeg'], magic: [0xff, 0xd8, 0xff] },
	'image/png': { ext: ['.png'], magic: [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a] },
	'image/webp': { ext: ['.webp'], magic: [0x52, 0x49, 0x46, 0x46] }, // RIFF…WEBP, checked below
	'application/pdf': { ext: ['.pdf'], magic: [0x25, 0x50, 0x44, 0x46, 0x2d] } // %PDF-
} as const;
export type AttachmentType = keyof typeof ATTACHMENT_TYPES;
export const MAX_ATTACHMENT_BYTES = 10 * 1024 * 1024;

/** The type the bytes show, or null when they are none of the accepted kinds. */
export function attachmentTypeOf(bytes: Uint8Array): AttachmentType | null {
	for (const [type, def] of Object.entries(ATTACHMENT_TYPES) as [
		AttachmentType,
		(typeof ATTACHMENT_TYPES)[AttachmentType]
	][]) {
		if (bytes.length < def.magic.length + 4) continue;
		if (!def.magic.every((b, i) => bytes[i] === b)) continue;
		if (type === 'image/webp' && String.fromCharCode(...bytes.slice(8, 12)) !== 'WEBP') continue;
		return type;
	}
	return null;
}
