import { describe, expect, it } from 'vitest';
import { layoutFiles, routeChunks } from '../../scripts/preload-web';

// The route context module as the web export writes it (shape copied from a production build).
const entry =
  'var a=1;__d(function(g,r,i,a,m,e,d){const t=Object.defineProperties({},{' +
  '"./(app)/_layout.tsx":{enumerable:!0,get:()=>r(d[1])(d[0],d.paths)},' +
  '"./(app)/admin.tsx":{enumerable:!0,get:()=>r(d[1])(d[2],d.paths)},' +
  '"./(app)/index.tsx":{enumerable:!0,get:()=>r(d[1])(d[3],d.paths)},' +
  '"./_layout.tsx":{enumerable:!0,get:()=>r(d[1])(d[4],d.paths)}});' +
  'function s(s){return t[s]}m.exports=s},9,{"0":743,"1":10,"2":744,"3":749,"4":762,' +
  '"paths":{"743":"/_expo/static/js/web/_layout-c1.js","744":"/_expo/static/js/web/admin-5a.js","749":"/_expo/static/js/web/index-ea.js","762":"/_expo/static/js/web/_layout-69.js"}});' +
  '__d(function(){},10,[]);';

describe('route chunks named in the entry bundle', () => {
  it('finds the chunk of each route file, in the order asked', () => {
    expect(routeChunks(entry, ['./_layout.tsx', './(app)/_layout.tsx', './(app)/index.tsx'])).toEqual([
      '/_expo/static/js/web/_layout-69.js',
      '/_expo/static/js/web/_layout-c1.js',
      '/_expo/static/js/web/index-ea.js',
    ]);
  });

  it('gives up (no preloads) when a route is missing or the bundle has another shape', () => {
    expect(routeChunks(entry, ['./_layout.tsx', './(app)/turnaround.tsx'])).toBeNull();
    expect(routeChunks('__d(function(){},0,[]);', ['./_layout.tsx'])).toBeNull();
  });
});

describe('layout files named in the entry bundle', () => {
  it('lists every layout of the route context once', () => {
    const nested = entry.replace('"./(app)/admin.tsx"', '"./(app)/studies/[id]/_layout.tsx"');
    expect(layoutFiles(nested)).toEqual(['./(app)/_layout.tsx', './(app)/studies/[id]/_layout.tsx', './_layout.tsx']);
    expect(layoutFiles('__d(function(){},0,[]);')).toEqual([]);
  });
});
