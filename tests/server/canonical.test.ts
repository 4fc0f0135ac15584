import { canonicalHash, canonicalJson, CanonicalJsonError, sha256Hex } from '@/server/services/canonical';
import { csvCell, csvRow } from '@/server/reports/csv';
import { decodeWords, parseMail } from '@/server/mail/mime';

describe('the canonical serialisation of a design', () => {
  it('sorts keys at every depth and writes no whitespace', () => {
    expect(canonicalJson({ b: 1, a: { d: [3, { z: 1, y: 2 }], c: 'x' } })).toBe('{"a":{"c":"x","d":[3,{"y":2,"z":1}]},"b":1}');
  });

  it('gives the same text whatever order the keys came in', () => {
    const one = { source: { voltage: 800, resistance: 0.05 }, capacitor: { capacitance: 940e-6 } };
    const two = { capacitor: { capacitance: 940e-6 }, source: { resistance: 0.05, voltage: 800 } };
    expect(canonicalJson(one)).toBe(canonicalJson(two));
    expect(canonicalHash(one)).toBe(canonicalHash(two));
  });

  it.each([
    [0.1 + 0.2, '0.30000000000000004'],
    [940e-6, '0.00094'],
    [1e21, '1e+21'],
    [-0, '0'],
    [12, '12'],
  ])('writes the number %p as JSON does (%s)', (value, text) => {
    expect(canonicalJson(value)).toBe(text);
  });

  it('leaves out undefined members and writes undefined array items as null, as JSON does', () => {
    expect(canonicalJson({ a: undefined, b: [undefined, 1] })).toBe('{"b":[null,1]}');
  });

  it('refuses NaN and infinities, naming the field', () => {
    expect(() => canonicalJson({ capacitor: { capacitance: Number.NaN } })).toThrow(CanonicalJsonError);
    expect(() => canonicalJson({ capacitor: { capacitance: Infinity } })).toThrow(/capacitor\.capacitance/);
  });

  it('hashes UTF-8 bytes with SHA-256 (the empty string has the published digest)', () => {
    // FIPS 180-4 test vector: SHA-256("") = e3b0c442…b855.
    expect(sha256Hex('')).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
    expect(canonicalJson({ name: 'Ω µ' })).toBe('{"name":"Ω µ"}');
  });
});

describe('CSV cells', () => {
  it.each([
    ['=HYPERLINK("http://x")', `"'=HYPERLINK(""http://x"")"`],
    ['+SUM(A1)', "'+SUM(A1)"],
    ['-2+3', "'-2+3"],
    ['−1', "'−1"],
    ['@cmd', "'@cmd"],
    ['\tTab', "'\tTab"],
    ['plain text', 'plain text'],
    ['a,b', '"a,b"'],
    ['say "hi"', '"say ""hi"""'],
  ])('escapes %j as %j', (input, output) => {
    expect(csvCell(input)).toBe(output);
  });

  it('writes numbers, negative ones included, as numbers', () => {
    expect(csvRow([-12.5, 1e-6, 0, null, Number.NaN])).toBe('-12.5,0.000001,0,,');
    expect(csvCell('-12.5')).toBe('-12.5');
  });
});

describe('reading back captured mail', () => {
  it('decodes encoded words in headers', () => {
    expect(decodeWords('=?UTF-8?Q?Tom=C3=A1s_Berg?= <tomas@northfold.example>')).toBe('Tomás Berg <tomas@northfold.example>');
    expect(decodeWords('=?utf-8?B?UmV2aWV3IOKAlCBPaG0gzqk=?=')).toBe('Review — Ohm Ω');
  });

  it('finds the text and HTML parts of a multipart message with quoted-printable bodies', () => {
    const raw = [
      'From: Ringwell <ringwell@northfold.example>',
      'To: priya@northfold.example',
      'Subject: =?UTF-8?Q?Review_requested:_Depot_charger_=E2=80=94_r1?=',
      'X-Ringwell-Outbox-Id: 00000000-0000-4000-8000-000000000001',
      'MIME-Version: 1.0',
      'Content-Type: multipart/alternative; boundary="--_b1"',
      '',
      '----_b1',
      'Content-Type: text/plain; charset=utf-8',
      'Content-Transfer-Encoding: quoted-printable',
      '',
      'Margins: 0 fail, 940 =C2=B5F, a long line that is soft=',
      ' wrapped.',
      '----_b1',
      'Content-Type: text/html; charset=utf-8',
      'Content-Transfer-Encoding: base64',
      '',
      Buffer.from('<p>Ω</p>').toString('base64'),
      '----_b1--',
      '',
    ].join('\r\n');
    const mail = parseMail(Buffer.from(raw, 'latin1'));
    expect(mail.subject).toBe('Review requested: Depot charger — r1');
    expect(mail.to).toEqual(['priya@northfold.example']);
    expect(mail.headers['x-ringwell-outbox-id']).toBe('00000000-0000-4000-8000-000000000001');
    expect(mail.text).toBe('Margins: 0 fail, 940 µF, a long line that is soft wrapped.');
    expect(mail.html).toBe('<p>Ω</p>');
  });
});
