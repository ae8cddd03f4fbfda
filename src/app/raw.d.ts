// Vite's `?raw` imports: the file's text as a string.
declare module '*.md?raw' {
  const text: string
  export default text
}
