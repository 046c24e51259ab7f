import { describe, expect, it } from 'vitest';
import { attachmentTypeOf } from './kinds';

const bytes = (...parts: (number[] | string)[]) =>
	new Uint8Array(
		parts.flatMap((p) => (typeof p === 'string' ? [...p].map((c) => c.charCodeAt(0)) : p))
	);

describe('attachment types by their bytes', () => {
	it('knows JPEG, PNG, WebP and PDF by their signatures', () => {
		// signatures: JPEG SOI FF D8 FF (ITU T.81); PNG 89 50 4E 47 0D 0A 1A 0A (ISO/IEC 15948);
		// WebP RIFF….WEBP (RFC 9649); PDF "%PDF-" (ISO 32000)
		expect(attachmentTypeOf(bytes([0xff, 0xd8, 0xff, 0xe0], 'JFIF\0'))).toBe('image/jpeg');
		expect(attachmentTypeOf(bytes([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a], 'IHDR'))).toBe(
			'image/png'
		);
		expect(attachmentTypeOf(bytes('RIFF', [0x10, 0, 0, 0], 'WEBPVP8 '))).toBe('image/webp');
		expect(attachmentTypeOf(bytes('%PDF-1.7\n%'))).toBe('application/pdf');
	});

	it('refuses anything else, including a RIFF that is not WebP and text named .pdf', () => {
		expect(attachmentTypeOf(bytes('RIFF', [0x10, 0, 0, 0], 'WAVEfmt '))).toBeNull();
		expect(attachmentTypeOf(bytes('<html><script>alert(1)</script>'))).toBeNull();
		expect(attachmentTypeOf(bytes([0x25, 0x50]))).toBeNull();
		expect(attachmentTypeOf(new Uint8Array())).toBeNull();
	});
});
