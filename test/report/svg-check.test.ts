import { describe, expect, it } from 'vitest';
import { confusionChart, renderSvg } from '../../src/report/charts.js';
import { findActiveContent } from '../../src/report/svg-check.js';

// What counts as active follows the SVG 1.1 specification (W3C, "Scalable Vector Graphics (SVG) 1.1
// (Second Edition)", 2011): chapter 18 (scripting: the <script> element and the on… event attributes) and
// 23.4 (foreignObject); and the WHATWG URL Standard (2023) for reading a scheme after dropping leading
// controls and spaces and the tab/newline characters inside it.
describe('findActiveContent', () => {
  it('accepts text and attribute values that merely look like handlers or script', () => {
    const svg =
      '<svg xmlns="http://www.w3.org/2000/svg"><g aria-label="class: batch one=7; x onload=1">' +
      '<text x="1">x onload=1 &lt;script&gt;alert(1)&lt;/script&gt; javascript:void(0)</text>' +
      '<title>onclick=1 &gt; ok</title><path d="M0,0L1,1" title="a &gt; b onmouseover=2"/></g></svg>';
    expect(findActiveContent(svg)).toBeUndefined();
  });

  it('finds event attributes, script elements, foreignObject and javascript: URLs', () => {
    expect(findActiveContent('<svg><g onload="x()"></g></svg>')).toMatch(/event attribute 'onload'/);
    expect(findActiveContent('<svg><rect ONCLICK=x width="1"/></svg>')).toMatch(/event attribute 'ONCLICK'/);
    expect(findActiveContent('<svg><svg:script>x</svg:script></svg>')).toMatch(/<script>/);
    expect(findActiveContent('<svg><foreignObject></foreignObject></svg>')).toMatch(/<foreignobject>/);
    expect(findActiveContent('<svg><a xlink:href=" java&#x09;script:alert(1)">a</a></svg>')).toMatch(
      /javascript: URL in 'xlink:href'/,
    );
    expect(findActiveContent('<svg><a href="&#106;avascript:x">a</a></svg>')).toMatch(/javascript: URL/);
    expect(findActiveContent('<svg><rect style="fill: url( javascript:x )"/></svg>')).toMatch(
      /javascript: URL/,
    );
    // A '>' inside a quoted value does not end the tag: the handler after it is still seen.
    expect(findActiveContent('<svg><g title="a > b" onclick="x"></g></svg>')).toMatch(/onclick/);
    expect(findActiveContent('<svg><g title="never closed></g></svg>')).toMatch(/unterminated/);
  });

  it('lets a chart whose class labels read like handlers render (they were refused before)', async () => {
    const svg = await renderSvg(
      confusionChart(
        ['batch one=7', 'x onload=1'],
        [
          [3, 1],
          [0, 4],
        ],
        'landscape · pca-svm',
      ),
    );
    expect(svg).toContain('x onload=1');
    expect(findActiveContent(svg)).toBeUndefined();
  });
});
