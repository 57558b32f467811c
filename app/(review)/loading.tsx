// Pages show this while their data streams in. The evidence pages have none: their figures and charts come in the
// first HTML (app/(evidence), docs/architecture.md, "Evidence caching").
export { default } from "../_components/page-loading";
