import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { Linked } from './outbox-screen';

describe('links in outbox mail', () => {
  it('turns web addresses into links and leaves the rest as text', () => {
    const html = renderToStaticMarkup(
      <Linked text={'To choose your password, open this link within 72 hours:\nhttp://shop-pc:3000/accept-invitation?token=abc_DEF-123.\nThanks'} />,
    );
    expect(html).toBe(
      'To choose your password, open this link within 72 hours:\n<a href="http://shop-pc:3000/accept-invitation?token=abc_DEF-123">http://shop-pc:3000/accept-invitation?token=abc_DEF-123</a>.\nThanks',
    );
  });

  it('links nothing but http and https, and escapes the text', () => {
    expect(renderToStaticMarkup(<Linked text={'javascript:alert(1) <b>x</b> ftp://host/file'} />)).toBe(
      'javascript:alert(1) &lt;b&gt;x&lt;/b&gt; ftp://host/file',
    );
  });
});
