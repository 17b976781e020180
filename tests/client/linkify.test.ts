import { describe, expect, it } from 'vitest';
import { linkify } from '@client/utils/linkify';

describe('linkify', () => {
  it('splits text around http(s) links and leaves the closing full stop out', () => {
    expect(linkify('Open http://localhost:3000/accept-invite?token=abc. Thanks')).toEqual([
      { text: 'Open ' },
      { text: 'http://localhost:3000/accept-invite?token=abc', href: 'http://localhost:3000/accept-invite?token=abc' },
      { text: '. Thanks' },
    ]);
  });
  it('makes no link from other schemes', () => {
    expect(linkify('javascript:alert(1) and mailto:a@b.test')).toEqual([{ text: 'javascript:alert(1) and mailto:a@b.test' }]);
  });
  it('returns the text whole when there is no link, and nothing for empty text', () => {
    expect(linkify('Hello')).toEqual([{ text: 'Hello' }]);
    expect(linkify('')).toEqual([]);
  });
});
