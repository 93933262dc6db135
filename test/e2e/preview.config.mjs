// The config the browser tests' `vite preview` starts with (test/e2e/harness.ts): none of the
// app's build settings or plugins, which a static server of dist/ never uses (the harness names
// the folder to serve with --outDir), so the server starts in about half the time. It serves
// dist/ exactly as `npm run preview` does: same files, headers and index.html fallback.
export default {};
