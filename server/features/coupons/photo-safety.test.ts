import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { startHarness, type Harness } from '../../testing/harness';
import { photos } from '../../db/schema/coupons';

let h: Harness;
beforeEach(async () => {
  h = await startHarness();
});
afterEach(async () => {
  await h.close();
});

const photoDir = () => path.join(h.dir, 'photos');
const storedFiles = () => (fs.existsSync(photoDir()) ? fs.readdirSync(photoDir()) : []);
const realJpeg = () => sharp({ create: { width: 16, height: 12, channels: 3, background: { r: 160, g: 110, b: 60 } } }).jpeg();

describe('photos are decoded and re-encoded', () => {
  it('refuses a file with an image signature followed by HTML, and stores nothing', async () => {
    const tech = await h.signIn('tech@demo.test');
    const before = h.database.db.select().from(photos).all().length;
    for (const [sig, name] of [
      [Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), 'page.png'],
      [Buffer.from([0xff, 0xd8, 0xff, 0xe0]), 'page.jpg'],
    ] as const) {
      const body = Buffer.concat([sig, Buffer.from('<html><script>alert(document.cookie)</script></html>')]);
      const res = await tech.post('/api/coupons/1/photos').attach('file', body, name);
      expect(res.status, name).toBe(422);
      expect(res.body.error.fieldErrors.file[0]).toMatch(/is not a JPEG, PNG or WebP image/);
    }
    expect(h.database.db.select().from(photos).all()).toHaveLength(before);
    expect(storedFiles()).toEqual([]);
  });

  it('strips camera metadata (EXIF, GPS) from what it stores and serves', async () => {
    const withExif = await realJpeg()
      .withExif({ IFD0: { Artist: 'Someone', Copyright: 'Invented' }, IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '47/1 30/1 0/1' } })
      .toBuffer();
    expect((await sharp(withExif).metadata()).exif).toBeDefined();
    const tech = await h.signIn('tech@demo.test');
    const res = await tech.post('/api/coupons/1/photos').attach('file', withExif, 'blank.jpg');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.photo.mimeType).toBe('image/jpeg');
    const served = (await tech.get(res.body.photo.url).buffer(true)).body as Buffer;
    expect(served.includes(Buffer.from('Someone'))).toBe(false);
    const meta = await sharp(served).metadata();
    expect(meta).toMatchObject({ format: 'jpeg', width: 16, height: 12 });
    expect(meta.exif).toBeUndefined();
    expect(res.body.photo.bytes).toBe(served.length);
  });
});

describe('photo files on disk', () => {
  it('are owner-only: the folder 0700, each file 0600', async () => {
    const tech = await h.signIn('tech@demo.test');
    const res = await tech.post('/api/coupons/1/photos').attach('file', await realJpeg().toBuffer(), 'a.jpg');
    expect(res.status).toBe(201);
    expect(fs.statSync(photoDir()).mode & 0o777).toBe(0o700);
    const [file] = storedFiles();
    expect(fs.statSync(path.join(photoDir(), file!)).mode & 0o777).toBe(0o600);
  });

  it('a write that fails on a full disk answers 507 and leaves no empty file behind', async () => {
    const tech = await h.signIn('tech@demo.test');
    const jpeg = await realJpeg().toBuffer();
    // The disk is the one true external here: the file is created, then the write runs out of space,
    // as ENOSPC does on a real full disk.
    const realWrite = fs.promises.writeFile;
    const spy = vi.spyOn(fs.promises, 'writeFile').mockImplementation(async (file, _data, options) => {
      await realWrite(file as string, Buffer.alloc(0), options as fs.WriteFileOptions);
      throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC', errno: -28, syscall: 'write' });
    });
    let res;
    try {
      res = await tech.post('/api/coupons/1/photos').attach('file', jpeg, 'a.jpg');
    } finally {
      spy.mockRestore();
    }
    expect(res.status).toBe(507);
    expect(res.body.error.code).toBe('storage_full');
    expect(storedFiles()).toEqual([]);
  });
});
