/**
 * Display names of uploads and the Content-Disposition they are downloaded with.
 *
 * OWASP File Upload Cheat Sheet, "Filename Sanitization" (a length limit, dangerous characters
 * removed) and "Extension Validation" (double extensions, null bytes); OWASP ASVS 5.0 requirements
 * 5.3.2 (user-submitted names never reach file paths), 5.4.1 and 5.4.2 (the server names the file
 * in Content-Disposition, encoded following RFC 6266).
 */
import { describe, expect, it } from 'vitest';
import { MAX_NAME_CHARS, contentDisposition, safeDisplayName } from '../../../api/uploads/names';

const JPEG = ['jpg', 'jpeg', 'jpe'];
const PDF = ['pdf'];
const TEXT = ['txt', 'text', 'log', 'md'];

describe('safe display names', () => {
  it('keeps an ordinary name as it is', () => {
    expect(safeDisplayName('Rev B bodge wire.jpg', JPEG)).toBe('Rev B bodge wire.jpg');
    expect(safeDisplayName('Schaltplan Übersicht.pdf', PDF)).toBe('Schaltplan Übersicht.pdf');
  });

  it('keeps only the last path segment, for both kinds of slash (path traversal)', () => {
    expect(safeDisplayName('../../etc/passwd', TEXT)).toBe('passwd.txt');
    expect(safeDisplayName('..\\..\\windows\\win.ini', TEXT)).toBe('win.ini.txt');
    expect(safeDisplayName('/var/www/html/shell.php.jpg', JPEG)).toBe('shell.php.jpg');
  });

  it('removes NUL and every other control character, so nothing after a NUL can be cut off or hidden', () => {
    expect(safeDisplayName('photo\u0000.php.jpg', JPEG)).toBe('photo.php.jpg');
    expect(safeDisplayName('a\u0007b\u001bc\u007fd.jpg', JPEG)).toBe('abcd.jpg');
  });

  it('removes carriage returns and line feeds (no header or log injection)', () => {
    expect(safeDisplayName('bad\r\nSet-Cookie: x=1.jpg', JPEG)).toBe('bad Set-Cookie_ x=1.jpg');
  });

  it('removes bidirectional overrides and isolates, so an .exe cannot pose as a .jpg', () => {
    // U+202E RIGHT-TO-LEFT OVERRIDE makes "photo\u202Egpj.exe" display as "photoexe.jpg".
    const name = safeDisplayName('photo\u202Egpj.exe', JPEG);
    expect(name).toBe('photogpj.exe.jpg');
    for (const control of ['\u202A', '\u202B', '\u202C', '\u202D', '\u202E', '\u2066', '\u2067', '\u2068', '\u2069']) {
      expect(safeDisplayName(`x${control}y.pdf`, PDF)).toBe('xy.pdf');
    }
  });

  it('collapses whitespace and drops leading dots (no hidden files)', () => {
    expect(safeDisplayName('  scope \t trace   at\u00a0 5V .jpg', JPEG)).toBe('scope trace at 5V.jpg');
    expect(safeDisplayName('.htaccess', TEXT)).toBe('htaccess.txt');
  });

  it('cuts a long name to the limit and keeps its extension', () => {
    const name = safeDisplayName(`${'a'.repeat(300)}.jpg`, JPEG);
    expect(name).toHaveLength(MAX_NAME_CHARS);
    expect(name).toBe(`${'a'.repeat(MAX_NAME_CHARS - 4)}.jpg`);
  });

  it('counts characters, not UTF-16 units, and never splits a surrogate pair', () => {
    const name = safeDisplayName(`${'📷'.repeat(200)}.jpg`, JPEG);
    expect([...name]).toHaveLength(MAX_NAME_CHARS);
    expect(name.isWellFormed()).toBe(true);
  });

  it('always ends in an extension of the type the content has, whatever the name claimed', () => {
    expect(safeDisplayName('notes.html', PDF)).toBe('notes.html.pdf');
    expect(safeDisplayName('board.JPEG', JPEG)).toBe('board.JPEG');
    expect(safeDisplayName('no extension', JPEG)).toBe('no extension.jpg');
  });

  it('gives a name to a file whose name was nothing but dots, slashes or controls', () => {
    expect(safeDisplayName('../', JPEG, 'photo')).toBe('photo.jpg');
    expect(safeDisplayName('\u202E\u0000', PDF)).toBe('file.pdf');
    expect(safeDisplayName('.jpg', JPEG, 'photo')).toBe('jpg.jpg');
  });
});

describe('Content-Disposition (RFC 6266 with RFC 8187 filename*)', () => {
  it('gives an ASCII name as is, in both parameters', () => {
    expect(contentDisposition('attachment', 'schematic rev B.pdf')).toBe(
      `attachment; filename="schematic rev B.pdf"; filename*=UTF-8''schematic%20rev%20B.pdf`,
    );
  });

  it('percent-encodes UTF-8 in filename* and falls back to underscores in filename', () => {
    // RFC 6266 appendix D / RFC 8187 §3.2.3 example: "€ rates" is encoded as %E2%82%AC%20rates.
    expect(contentDisposition('attachment', '€ rates.csv')).toBe(`attachment; filename="_ rates.csv"; filename*=UTF-8''%E2%82%AC%20rates.csv`);
  });

  it('cannot be broken out of: quotes, backslashes and separators stay inside the values', () => {
    const header = contentDisposition('inline', 'a"; filename=evil.html; x="\\.jpg');
    const plain = /filename="([^"]*)"/.exec(header)?.[1];
    expect(plain).toBe('a_; filename=evil.html; x=__.jpg');
    expect(header).toMatch(/filename\*=UTF-8''[A-Za-z0-9%._~!$&+,;=:@-]*$/);
    expect(header.match(/"/g)).toHaveLength(2);
    expect(header).toContain("filename*=UTF-8''a%22%3B%20filename%3Devil.html%3B%20x%3D%22%5C.jpg");
  });
});
