import localFont from 'next/font/local';

/** Self-hosted faces (fonts/): a hyperlegible text face and a monospaced face for figures. */
export const textFace = localFont({
  src: [
    { path: '../fonts/atkinson-hyperlegible-latin-400-normal.woff2', weight: '400', style: 'normal' },
    { path: '../fonts/atkinson-hyperlegible-latin-700-normal.woff2', weight: '700', style: 'normal' },
  ],
  variable: '--font-text',
  display: 'swap',
});

export const figuresFace = localFont({
  src: [
    { path: '../fonts/ibm-plex-mono-latin-400-normal.woff2', weight: '400', style: 'normal' },
    { path: '../fonts/ibm-plex-mono-latin-600-normal.woff2', weight: '600', style: 'normal' },
  ],
  variable: '--font-figures',
  display: 'swap',
});
