import { describe, expect, test } from 'vitest';
import { ChunkDecoder, decodeBytes, detectEncoding } from './text';
import { latin1, utf8 } from './testing';

describe('text decoding', () => {
	test('UTF-8 BOM is detected and dropped (Unicode 15, 23.8: U+FEFF as EF BB BF)', () => {
		const r = decodeBytes(new Uint8Array([0xef, 0xbb, 0xbf, ...utf8('Düse')]));
		expect(r).toEqual({ text: 'Düse', encoding: 'utf-8', hasBom: true });
	});

	test('Latin-1 bytes fail strict UTF-8 and are read as windows-1252 (0xE4 = ä in ISO 8859-1)', () => {
		expect(detectEncoding(latin1('Längengrad')).encoding).toBe('windows-1252');
		expect(decodeBytes(latin1('Längengrad')).text).toBe('Längengrad');
	});

	test('a UTF-8 character split across chunks comes out whole', () => {
		const bytes = utf8('aé€b');
		const d = new ChunkDecoder();
		const parts = [...bytes].map((b) => d.decode(new Uint8Array([b])));
		expect(parts.join('') + d.end()).toBe('aé€b');
		expect(d.encoding).toBe('utf-8');
		expect(d.replaced).toBe(0);
	});
});
