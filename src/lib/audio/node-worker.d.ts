/** `import url from './x.ts?nodeworker'`: the URL of a Node worker module (see vite-node-worker.ts). */
declare module '*?nodeworker' {
  const workerUrl: string;
  export default workerUrl;
}
