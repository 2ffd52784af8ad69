// Tailwind CSS 4 runs as a PostCSS plugin; the theme tokens live in tailwind.config.ts (loaded by @config
// in app/globals.css).
const config = {
  plugins: {
    '@tailwindcss/postcss': {},
  },
};

export default config;
