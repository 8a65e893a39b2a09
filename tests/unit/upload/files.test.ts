import { describe, expect, it } from 'vitest';
import {
  sanitizeDisplayName,
  sniffMasterHeader,
  titleFromFileName,
} from '@/lib/server/uploads/files';

const bytes = (text: string, pad = 16) =>
  Uint8Array.from([...Buffer.from(text, 'latin1'), ...new Array(pad).fill(0)]);

describe('sniffMasterHeader', () => {
  it.each([
    ['RIFF\0\0\0\0WAVE', 'wav', 'wav'],
    ['RF64\xff\xff\xff\xffWAVE', 'rf64', 'wav'],
    ['BW64\0\0\0\0WAVE', 'bw64', 'wav'],
    ['FORM\0\0\0\0AIFF', 'aiff', 'aif'],
    ['FORM\0\0\0\0AIFC', 'aifc', 'aif'],
  ])('accepts %j as %s', (head, container, extension) => {
    expect(sniffMasterHeader(bytes(head))).toMatchObject({ ok: true, container, extension });
  });

  it.each([
    ['fLaC\0\0\0\x22', 'FLAC'],
    ['ID3\x04\0\0\0\0\0\0', 'MP3'],
    ['\xff\xfb\x90\x64', 'MP3'],
    ['OggS\0\x02', 'Ogg'],
    ['\0\0\0\x20ftypM4A ', 'MP4'],
    ['%PDF-1.7', 'PDF'],
    ['title,isrc\nSalt Marsh,XQ', 'text file'],
    ['RIFF\0\0\0\0AVI ', 'not a WAV'],
  ])('refuses %j, naming %s', (head, word) => {
    const result = sniffMasterHeader(Buffer.from(head, 'latin1'));
    expect(result.ok).toBe(false);
    if (!result.ok) {
      expect(result.message).toContain(word);
      expect(result.message).toContain('nothing was stored');
    }
  });

  it('refuses an empty body and a header cut short', () => {
    expect(sniffMasterHeader(new Uint8Array()).ok).toBe(false);
    expect(sniffMasterHeader(bytes('RIFF', 0)).ok).toBe(false);
  });
});

describe('sanitizeDisplayName', () => {
  it.each([
    ['01 Harbour Lights.wav', '01 Harbour Lights.wav'],
    ['../../etc/passwd', 'passwd'],
    ['C:\\masters\\final\\Side A.wav', 'Side A.wav'],
    ['evil\u0000name\u0007.wav', 'evilname.wav'],
    ['right\u202eto\u200bleft.wav', 'righttoleft.wav'],
    ['  lots   of\tspace .wav ', 'lots of space .wav'],
    ['Café Ørsted – Ω.aiff', 'Café Ørsted – Ω.aiff'],
  ])('%j → %j', (raw, clean) => {
    expect(sanitizeDisplayName(raw)).toBe(clean);
  });

  it.each(['', '..', '../..', '/', '\u0000\u0001', '...'])('%j leaves nothing usable', (raw) => {
    expect(sanitizeDisplayName(raw)).toBeNull();
  });

  it('keeps at most 255 characters', () => {
    expect(Array.from(sanitizeDisplayName(`${'é'.repeat(400)}.wav`) ?? '')).toHaveLength(255);
  });
});

describe('titleFromFileName', () => {
  it.each([
    ['01 Harbour Lights.wav', 'Harbour Lights'],
    ['02 - Customs House.WAV', 'Customs House'],
    ['3. The_Long_Swell.aiff', 'The Long Swell'],
    ['Tender to Shore (Master) 24-96.wav', 'Tender to Shore (Master) 24-96'],
    ['1979.wav', '1979'],
    ['.wav', 'Untitled'],
  ])('%j → %j', (name, title) => {
    expect(titleFromFileName(name)).toBe(title);
  });
});
