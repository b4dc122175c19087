/**
 * The stylesheet of the server-made pages (start page, error codes, error pages; the API
 * reference has its own, src/http/pages/reference.ts). The inspector's palette, so the pages
 * read as one site; system fonts only, nothing fetched from elsewhere. A module, not a file, so the CLI bundle carries it.
 */
export const siteCss = `
:root {
  --ink: #1d2326; --muted: #5a6469; --paper: #f6f5f2; --card: #ffffff; --line: #d5d3cd;
  --accent: #2c5d73; --focus: #b3541e; --warp: #e4e1d8;
  --get: #2f6b3a; --post: #8a5a00; --client: #8a5a00; --server: #a3261c;
  color-scheme: light;
}
* { box-sizing: border-box; }
body { margin: 0; font: 16px/1.55 system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", sans-serif; color: var(--ink); background: var(--paper); }
:focus-visible { outline: 3px solid var(--focus); outline-offset: 2px; }
a { color: var(--accent); }
code, pre { font: .9em/1.45 ui-monospace, "SFMono-Regular", "DejaVu Sans Mono", Menlo, monospace; }
pre { background: var(--card); border: 1px solid var(--line); border-left: 4px solid var(--accent); padding: .75rem 1rem; overflow-x: auto; }
.frame { max-width: 72rem; margin: 0 auto; padding: 0 1.5rem; }
/* The band: a thin woven edge (warp threads) under the masthead. */
.band { background: var(--card); border-bottom: 3px solid transparent;
  border-image: repeating-linear-gradient(90deg, var(--accent) 0 6px, var(--warp) 6px 9px) 3; }
.band .frame { display: flex; flex-wrap: wrap; align-items: center; gap: .5rem 2rem; padding-top: .8rem; padding-bottom: .8rem; }
.mark { display: inline-flex; align-items: center; gap: .5rem; font-weight: 700; font-size: 1.15rem; color: var(--ink); text-decoration: none; letter-spacing: .02em; }
nav { display: flex; flex-wrap: wrap; gap: .25rem 1.25rem; }
nav a { text-decoration: none; padding: .15rem 0; border-bottom: 2px solid transparent; }
nav a:hover, nav a[aria-current="page"] { border-bottom-color: var(--focus); }
main { padding-bottom: 3rem; }
h1 { font-size: 1.7rem; margin: 1.5rem 0 .25rem; }
h2 { font-size: 1.25rem; margin: 2rem 0 .5rem; padding-bottom: .25rem; border-bottom: 1px solid var(--line); }
h3 { font-size: 1.05rem; margin: 1.25rem 0 .35rem; }
.lede { font-size: 1.1rem; color: var(--muted); max-width: 48rem; margin-top: 0; }
.muted { color: var(--muted); }
.links { display: grid; grid-template-columns: repeat(auto-fill, minmax(10.5rem, 1fr)); gap: .75rem; padding: 0; list-style: none; }
.links li { background: var(--card); border: 1px solid var(--line); border-radius: 6px; padding: .6rem .9rem; }
.links a { font-weight: 600; }
.links span { display: block; color: var(--muted); font-size: .9rem; }
form.try { display: flex; flex-wrap: wrap; gap: .75rem 1rem; align-items: flex-end; background: var(--card); border: 1px solid var(--line); border-radius: 6px; padding: 1rem; }
form.try label { display: flex; flex-direction: column; font-weight: 600; font-size: .9rem; }
input, select, button { font: inherit; padding: .35rem .5rem; border: 1px solid #9aa3a7; border-radius: 4px; background: #fff; color: var(--ink); }
button { background: var(--accent); border-color: var(--accent); color: #fff; font-weight: 600; padding: .45rem 1.25rem; cursor: pointer; }
.shelf { display: grid; grid-template-columns: repeat(auto-fill, minmax(15.5rem, 1fr)); gap: 1rem; padding: 0; list-style: none; }
.shelf li { background: var(--card); border: 1px solid var(--line); border-radius: 6px; overflow: hidden; }
.shelf img { display: block; width: 100%; height: auto; background: var(--warp); }
.shelf .about { padding: .5rem .75rem .7rem; }
.shelf .name { font-weight: 600; overflow-wrap: anywhere; }
.shelf .acts { display: flex; flex-wrap: wrap; gap: .2rem .8rem; font-size: .9rem; }
.note { background: #fbf3e6; border: 1px solid #e6cfa6; border-radius: 6px; padding: .6rem .9rem; max-width: 48rem; }
table { border-collapse: collapse; width: 100%; background: var(--card); margin: .5rem 0 1rem; }
th, td { text-align: left; vertical-align: top; padding: .4rem .6rem; border-bottom: 1px solid var(--line); }
th { font-size: .85rem; color: var(--muted); font-weight: 600; }
tr:target { background: #fbf3e6; }
.status { font-weight: 700; font-family: ui-monospace, monospace; }
.status.s4 { color: var(--client); } .status.s5 { color: var(--server); } .status.s2, .status.s3 { color: var(--get); }
.problem { background: var(--card); border: 1px solid var(--line); border-left: 6px solid var(--server); border-radius: 6px; padding: .5rem 1.25rem 1rem; max-width: 48rem; }
.problem.s4 { border-left-color: var(--client); }
.problem dl { display: grid; grid-template-columns: max-content 1fr; gap: .25rem 1rem; }
.problem dt { color: var(--muted); } .problem dd { margin: 0; overflow-wrap: anywhere; }
`;
