// Asset URLs as the bundler provides them (`?url` imports), used only by the browser's solver loader.
declare module '*?url' {
  const url: string
  export default url
}
