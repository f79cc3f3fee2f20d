// Runs inside Chromium (one executeScript call): lists the rendered text of a page with the colours
// the browser computed, composited the way a browser paints them.
// arguments[0]: {root: index into querySelectorAll(INTERACTIVE) or null, interactive: selector}
// Returns {samples, skipped, interactive}; see tests/browser/README.md for the fields.
const args = arguments[0] || {};
const SVG_NS = "http://www.w3.org/2000/svg";
const SKIP_SUBTREE = new Set(["head", "script", "style", "template", "noscript", "title"]);
const SVG_TEXT = new Set(["text", "tspan"]);
const EPS = 1e-9;

// ---- colours: computed values -> [r, g, b, a] floats, sRGB encoded, 0..1 -----------------------

function mul(m, v) {
  return [0, 1, 2].map(i => m[i][0] * v[0] + m[i][1] * v[1] + m[i][2] * v[2]);
}
// CSS Color 4, sample code section (matrices also in colour-science; tests cross-check).
const XYZ65_TO_LIN_SRGB = [
  [3.2409699419045226, -1.537383177570094, -0.4986107602930034],
  [-0.9692436362808796, 1.8759675015077202, 0.04155505740717559],
  [0.05563007969699366, -0.20397695888897652, 1.0569715142428786]];
const D50_TO_D65 = [  // Bradford
  [0.955473421488075, -0.02309845494876471, 0.06325924320057072],
  [-0.0283697093338637, 1.0099953980813041, 0.021041441191917323],
  [0.012314014864481998, -0.020507649298898964, 1.330365926242124]];
const LIN_P3_TO_XYZ65 = [
  [0.4865709486482162, 0.26566769316909306, 0.1982172852343625],
  [0.2289745640697488, 0.6917385218365064, 0.079286914093745],
  [0, 0.04511338185890264, 1.043944368900976]];
const D50_WHITE = [0.3457 / 0.3585, 1, (1 - 0.3457 - 0.3585) / 0.3585];

function encode(c) {  // linear -> sRGB transfer, sign preserving
  const s = c < 0 ? -1 : 1, a = Math.abs(c);
  return s * (a <= 0.0031308 ? 12.92 * a : 1.055 * Math.pow(a, 1 / 2.4) - 0.055);
}
function decode(c) {
  const s = c < 0 ? -1 : 1, a = Math.abs(c);
  return s * (a <= 0.04045 ? a / 12.92 : Math.pow((a + 0.055) / 1.055, 2.4));
}
function labToXyz50(L, a, b) {
  const k = 24389 / 27, e = 216 / 24389;
  const f1 = (L + 16) / 116, f0 = a / 500 + f1, f2 = f1 - b / 200;
  const x = f0 ** 3 > e ? f0 ** 3 : (116 * f0 - 16) / k;
  const y = L > k * e ? f1 ** 3 : L / k;
  const z = f2 ** 3 > e ? f2 ** 3 : (116 * f2 - 16) / k;
  return [x * D50_WHITE[0], y * D50_WHITE[1], z * D50_WHITE[2]];
}
function oklabToLinSrgb(L, a, b) {  // Ottosson's published OKLab matrices
  const l = (L + 0.3963377774 * a + 0.2158037573 * b) ** 3;
  const m = (L - 0.1055613458 * a - 0.0638541728 * b) ** 3;
  const s = (L - 0.0894841775 * a - 1.2914855480 * b) ** 3;
  return [4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s,
          -1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s,
          -0.0041960863 * l - 0.7034186147 * m + 1.7076147010 * s];
}
function num(tok, pct) {  // a component: number, percentage (of pct) or none
  if (tok === "none") return 0;
  if (tok.endsWith("%")) return parseFloat(tok) / 100 * pct;
  if (tok.endsWith("deg")) return parseFloat(tok);
  return parseFloat(tok);
}
const clip01 = v => Math.min(1, Math.max(0, v));

// Returns [r, g, b, a] (encoded sRGB, clipped to the gamut) or null for a space not handled here.
function parseColour(text) {
  const m = /^([a-z-]+)\((.*)\)$/.exec(text.trim());
  if (!m) return null;
  const fn = m[1];
  let body = m[2], alpha = 1;
  if (fn === "rgb" || fn === "rgba") {
    const p = body.split(/[\s,\/]+/).filter(Boolean);
    alpha = p.length > 3 ? num(p[3], 1) : 1;
    return [num(p[0], 255) / 255, num(p[1], 255) / 255, num(p[2], 255) / 255, clip01(alpha)].map(clip01);
  }
  const slash = body.split("/");
  if (slash.length > 1) alpha = num(slash[1].trim(), 1);
  const p = slash[0].trim().split(/\s+/);
  let lin;
  if (fn === "color") {
    const space = p.shift();
    const v = p.map(t => num(t, 1));
    if (space === "srgb") return [v[0], v[1], v[2], alpha].map(clip01);
    if (space === "srgb-linear") lin = v;
    else if (space === "display-p3") lin = mul(XYZ65_TO_LIN_SRGB, mul(LIN_P3_TO_XYZ65, v.map(decode)));
    else if (space === "xyz" || space === "xyz-d65") lin = mul(XYZ65_TO_LIN_SRGB, v);
    else if (space === "xyz-d50") lin = mul(XYZ65_TO_LIN_SRGB, mul(D50_TO_D65, v));
    else return null;
  } else if (fn === "oklab") {
    lin = oklabToLinSrgb(num(p[0], 1), num(p[1], 0.4), num(p[2], 0.4));
  } else if (fn === "oklch") {
    const L = num(p[0], 1), C = num(p[1], 0.4), h = num(p[2], 1) * Math.PI / 180;
    lin = oklabToLinSrgb(L, C * Math.cos(h), C * Math.sin(h));
  } else if (fn === "lab") {
    lin = mul(XYZ65_TO_LIN_SRGB, mul(D50_TO_D65, labToXyz50(num(p[0], 100), num(p[1], 125), num(p[2], 125))));
  } else if (fn === "lch") {
    const L = num(p[0], 100), C = num(p[1], 150), h = num(p[2], 1) * Math.PI / 180;
    lin = mul(XYZ65_TO_LIN_SRGB, mul(D50_TO_D65, labToXyz50(L, C * Math.cos(h), C * Math.sin(h))));
  } else {
    return null;
  }
  return [encode(lin[0]), encode(lin[1]), encode(lin[2]), alpha].map(clip01);
}

// Colour functions inside a computed background-image (gradient stops).
function stopColours(image) {
  const out = [];
  const re = /(rgba?|color|oklab|oklch|lab|lch)\([^()]*\)/g;
  let m;
  while ((m = re.exec(image)) !== null) out.push(m[0]);
  return out;
}

// ---- premultiplied source-over ---------------------------------------------------------------

const premul = c => [c[0] * c[3], c[1] * c[3], c[2] * c[3], c[3]];
const fade = (p, o) => [p[0] * o, p[1] * o, p[2] * o, p[3] * o];
const over = (s, d) => [0, 1, 2, 3].map(i => s[i] + d[i] * (1 - s[3]));
const unpremul = p => p[3] > EPS ? [p[0] / p[3], p[1] / p[3], p[2] / p[3]] : [0, 0, 0];
const hex2 = v => Math.round(clip01(v) * 255).toString(16).padStart(2, "0");
const hex = c => "#" + hex2(c[0]) + hex2(c[1]) + hex2(c[2]) + (c.length > 3 && c[3] < 1 ? hex2(c[3]) : "");

// ---- per-element facts, cached for this call --------------------------------------------------

const cache = new Map();
function facts(el, pseudo) {
  const key = pseudo ? null : el;
  if (key && cache.has(key)) return cache.get(key);
  const computed = getComputedStyle(el, pseudo || null);
  const f = {
    el, pseudo, computed,
    bg: parseColour(computed.backgroundColor) || [0, 0, 0, 0],
    image: computed.backgroundImage,
    opacity: parseFloat(computed.opacity),
    effects: [],
  };
  if (computed.mixBlendMode !== "normal") f.effects.push("mix-blend-mode");
  if (computed.filter !== "none") f.effects.push("filter");
  if (computed.backdropFilter && computed.backdropFilter !== "none") f.effects.push("backdrop-filter");
  if (computed.backgroundClip === "text" || computed.webkitBackgroundClip === "text") f.effects.push("background-clip:text");
  if (key) cache.set(key, f);
  return f;
}

function xpath(el) {
  const parts = [];
  for (let e = el; e && e.nodeType === 1; e = e.parentElement) {
    const name = e.localName.toLowerCase();
    const parent = e.parentElement;
    let part = name;
    if (parent) {
      let count = 0, index = 0;
      for (const s of parent.children) {
        if (s.localName.toLowerCase() === name) {
          count++;
          if (s === e) index = count;
        }
      }
      if (count > 1) part += "[" + index + "]";
    }
    parts.push(part);
  }
  return "/" + parts.reverse().join("/");
}

function ownText(el) {
  let t = "";
  for (const n of el.childNodes) if (n.nodeType === 3) t += n.data;
  return t.replace(/\s+/g, " ").trim().slice(0, 60);
}

function hasOwnText(el) {
  for (const n of el.childNodes) if (n.nodeType === 3 && /\S/.test(n.data)) return true;
  return false;
}

// ---- rendered or not ------------------------------------------------------------------------

function zeroRect(clip) {  // computed clip: rect(top, right, bottom, left)
  const m = /^rect\((.*)\)$/.exec(clip);
  if (!m) return false;
  const v = m[1].split(/[\s,]+/).map(parseFloat);
  return v.length === 4 && (v[1] <= v[3] || v[2] <= v[0]);
}
function visuallyHidden(e) {
  const computed = facts(e).computed;
  if (computed.position !== "absolute" && computed.position !== "fixed") return false;
  if (zeroRect(computed.clip) || computed.clipPath === "inset(50%)") return true;
  if (computed.overflow === "hidden" || computed.overflowX === "hidden" || computed.overflowY === "hidden" || computed.overflow === "clip") {
    const r = e.getBoundingClientRect();
    if (r.width <= 1 || r.height <= 1) return true;
  }
  return false;
}

// null when rendered, else the reason it is not.
function hiddenReason(el) {
  if (!el.checkVisibility()) {
    if (el.closest("[hidden]")) return "hidden-attribute";
    const d = el.closest("details:not([open])");
    if (d && !(d.querySelector(":scope > summary") || {contains: () => false}).contains(el)) return "closed-details";
    return "display-none";
  }
  if (facts(el).computed.visibility !== "visible") return "visibility";
  let o = 1;
  for (let e = el; e; e = e.parentElement) o *= facts(e).opacity;
  if (o <= 0) return "opacity";
  for (let e = el; e; e = e.parentElement) if (visuallyHidden(e)) return "clipped";
  return null;
}

// ---- painting --------------------------------------------------------------------------------

function canvasBase() {
  const html = document.documentElement;
  let scheme = facts(html).computed.colorScheme;
  if (!scheme || scheme === "normal") {
    const meta = document.querySelector('meta[name="color-scheme"]');
    scheme = meta ? meta.content : "normal";
  }
  const words = scheme.split(/\s+/);
  const prefersDark = matchMedia("(prefers-color-scheme: dark)").matches;
  const dark = words.includes("dark") && (!words.includes("light") || prefersDark);
  // Chromium's dark canvas is rgb(18, 18, 18) (measured; tests/browser/test_chromium_reference.py).
  return dark ? [18 / 255, 18 / 255, 18 / 255, 1] : [1, 1, 1, 1];
}

// The element whose background paints the canvas (CSS Backgrounds 3, root element backgrounds).
function canvasSource() {
  const html = document.documentElement, f = facts(html);
  if (f.bg[3] > 0 || f.image !== "none") return html;
  const body = document.body;
  return body && body.parentElement === html ? body : null;
}

// layers: facts of the text's box (pseudo or element) then its ancestors up to <html>.
// swap: {index, colour} paints a solid colour in place of layer `index`'s background image.
function paint(layers, text, swap) {
  const canvasSrc = canvasSource(), html = document.documentElement;
  let fg = premul(text), bg = [0, 0, 0, 0];
  const reasons = [], gradients = [];
  for (let i = 0; i < layers.length; i++) {
    const f = layers[i];
    if (i > 0) {
      const o = layers[i - 1].opacity;
      fg = fade(fg, o);
      bg = fade(bg, o);
    }
    for (const e of f.effects) if (!reasons.includes(e)) reasons.push(e);
    if (!f.pseudo && (f.el === canvasSrc || f.el === html)) continue;  // painted on the canvas
    if (f.image !== "none" && bg[3] < 1 - EPS) {
      if (swap && swap.index === i) {
        fg = over(fg, premul(swap.colour));
        bg = over(bg, premul(swap.colour));
      } else {
        gradients.push({index: i, image: f.image});
      }
    }
    fg = over(fg, premul(f.bg));
    bg = over(bg, premul(f.bg));
  }
  const top = layers[layers.length - 1];
  fg = fade(fg, top.opacity);
  bg = fade(bg, top.opacity);
  let canvas = premul(canvasBase());
  if (canvasSrc) {
    const cf = facts(canvasSrc);
    if (cf.image !== "none" && bg[3] < 1 - EPS) gradients.push({index: -1, image: cf.image});
    canvas = over(premul(cf.bg), canvas);
  }
  fg = unpremul(over(fg, canvas));
  bg = unpremul(over(bg, canvas));
  return {fg, bg, reasons, gradients};
}

function textColour(computed) {
  const fill = computed.webkitTextFillColor;
  return fill && fill !== computed.color ? fill : computed.color;
}

function chainOf(el, pseudo) {
  const layers = pseudo ? [facts(el, pseudo)] : [];
  for (let e = el; e; e = e.parentElement) layers.push(facts(e));
  return layers;
}

// WCAG 2.2 scope of SC 1.4.3, decided from the browser's DOM: ":disabled" as Chromium matches it
// (native controls, and everything a disabled fieldset disables but its first legend),
// label.control, aria-labelledby, aria-hidden, and the characters of the text (Unicode
// properties as the JavaScript engine knows them). Colours are compared by the caller.
const DISABLEABLE = new Set(("application button checkbox combobox grid gridcell group link listbox " +
  "menu menubar menuitem menuitemcheckbox menuitemradio option radio radiogroup row scrollbar " +
  "searchbox separator slider spinbutton switch tab tablist tabpanel textbox toolbar tree treegrid " +
  "treeitem").split(" "));
const IMPLICIT = {button: "button", select: "combobox", textarea: "textbox", fieldset: "group",
                  details: "group", optgroup: "group", option: "option", summary: "button", tr: "row"};
function roleOf(e) {
  const explicit = (e.getAttribute("role") || "").trim().split(/\s+/)[0];
  if (explicit) return explicit.toLowerCase();
  const tag = e.localName;
  if (tag === "a") return e.hasAttribute("href") ? "link" : "";
  if (tag === "input") return "textbox";
  return IMPLICIT[tag] || "";
}
const PUA = /^[\s\uE000-\uF8FF]+$/u;
function named(e) {
  return ["aria-label", "aria-labelledby", "title"].some(a => (e.getAttribute(a) || "").trim());
}
function inactive(el) {  // inside a :disabled control; a disabled fieldset's first legend is not
  for (let e = el; e; e = e.parentElement) {
    if (!e.matches(":disabled")) continue;
    if (e.localName !== "fieldset") return true;
    const legend = [...e.children].find(c => c.localName === "legend");
    if (!(legend && legend.contains(el))) return true;
  }
  return false;
}
function scopeOf(el, text) {
  if (inactive(el)) return "inactive-control";
  const label = el.closest("label");
  if (label && label.control && label.control.matches(":disabled")) return "inactive-label";
  for (const c of document.querySelectorAll(":disabled[aria-labelledby]")) {
    for (const id of c.getAttribute("aria-labelledby").trim().split(/\s+/)) {
      const target = document.getElementById(id);
      if (target && target.contains(el)) return "inactive-label";
    }
  }
  for (let e = el; e; e = e.parentElement) {
    if ((e.getAttribute("aria-disabled") || "").trim().toLowerCase() === "true" && DISABLEABLE.has(roleOf(e)))
      return "inactive-widget";
  }
  if (el.closest("a:not([href]).disabled")) return "inactive-link";  // (tinctura's judgement)
  const hidden = !!el.closest('[aria-hidden="true" i]');
  const control = el.closest("a[href], button, summary");
  if (PUA.test(text)) {
    const visibleWords = control && [...control.querySelectorAll("*"), control].some(
      d => !d.closest('[aria-hidden="true" i]') && ownText(d) && !PUA.test(ownText(d)));
    const meaningful = hidden ? (control && !visibleWords) : (control || named(el));
    return meaningful ? "icon" : "decorative-icon";
  }
  if (hidden) return /[\p{L}\p{N}]/u.test(text) ? "hidden" : "decoration";
  const glyphs = [...text.replace(/\s/g, "")];
  if (control && named(control) && glyphs.length === 1 && !/\p{N}/u.test(glyphs[0]) &&
      control.textContent.replace(/\s+/g, " ").trim() === text.trim()) return "icon";
  return "";
}

function sample(el, pseudo, kind, text) {
  const layers = chainOf(el, pseudo);
  const computed = layers[0].computed;
  const raw = textColour(computed);
  const colour = parseColour(raw);
  const rec = {
    xpath: xpath(el), tag: el.localName.toLowerCase(), kind, text,
    font_size_px: parseFloat(computed.fontSize), font_weight: parseInt(computed.fontWeight, 10),
    fg_computed: raw, status: "determined", reason: "",
    disabled: !!(el.matches(":disabled") || el.closest(":disabled")),
    scope: scopeOf(el, text || ""),
  };
  if (pseudo) rec.pseudo = pseudo;
  if (!colour) {
    rec.status = "undetermined";
    rec.reason = "colour-space";
    return rec;
  }
  const p = paint(layers, colour);
  const reasons = p.reasons.slice();
  if (computed.textShadow !== "none") reasons.unshift("text-shadow");
  if (p.gradients.length) {
    const urls = p.gradients.some(g => /url\(|image-set\(|cross-fade\(/.test(g.image));
    reasons.unshift(urls ? "image" : "gradient");
  }
  rec.fg = hex(p.fg);
  rec.bg = hex(p.bg);
  if (rec.scope === "hidden") rec.scope = rec.fg === rec.bg ? "invisible" : "";
  rec.fg_float = p.fg;
  rec.bg_float = p.bg;
  rec.fg_raw = colour;
  if (reasons.length) {
    rec.status = "undetermined";
    rec.reason = reasons.join(" ");
    if (p.gradients.length) {
      rec.images = p.gradients.map(g => g.image);
      // The pixels at each stop: one gradient, nothing else in doubt.
      if (p.gradients.length === 1 && reasons.length === 1 && reasons[0] === "gradient" && p.gradients[0].index >= 0) {
        const g = p.gradients[0];
        rec.stops = stopColours(g.image).map(s => {
          const c = parseColour(s);
          if (!c) return {stop: s};
          const q = paint(layers, colour, {index: g.index, colour: c});
          return {stop: hex(c), fg: hex(q.fg), bg: hex(q.bg), fg_float: q.fg, bg_float: q.bg};
        });
      }
    }
  }
  return rec;
}

function generatedText(content) {  // the quoted strings of a computed `content`
  if (!content || content === "none" || content === "normal") return "";
  let t = "";
  const re = /"((?:[^"\\]|\\.)*)"/g;
  let m;
  while ((m = re.exec(content)) !== null) t += m[1].replace(/\\(.)/g, "$1");
  return t.replace(/\s+/g, " ").trim().slice(0, 60);
}

// ---- walk --------------------------------------------------------------------------------------

const samples = [], skipped = {};
const skip = reason => { skipped[reason] = (skipped[reason] || 0) + 1; };
const interactiveList = Array.from(document.querySelectorAll(args.interactive || "a, button, input, select, textarea"));
const hasTextInside = new Set();

function isTextElement(el) {
  if (el.namespaceURI === SVG_NS && !SVG_TEXT.has(el.localName)) return false;
  return hasOwnText(el);
}

function visit(el) {
  const name = el.localName.toLowerCase();
  if (SKIP_SUBTREE.has(name) && el.namespaceURI !== SVG_NS) return;
  if (isTextElement(el)) {
    for (let e = el; e; e = e.parentElement) hasTextInside.add(e);
    const why = hiddenReason(el);
    if (why) skip(why);
    else samples.push(sample(el, null, el.namespaceURI === SVG_NS ? "svg-text" : "text", ownText(el)));
  }
  if (el.namespaceURI !== SVG_NS) {
    for (const pseudo of ["::before", "::after"]) {
      const pcs = getComputedStyle(el, pseudo);
      const text = generatedText(pcs.content);
      if (!text) continue;
      const why = hiddenReason(el) || (pcs.display === "none" ? "display-none" : null)
        || (pcs.visibility !== "visible" ? "visibility" : null) || (parseFloat(pcs.opacity) <= 0 ? "opacity" : null);
      if (why) skip(why);
      else samples.push(sample(el, pseudo, "generated", text));
    }
  }
  for (const c of el.children) visit(c);
}

let interactive = [];
if (args.root === null || args.root === undefined) {
  visit(document.documentElement);
  // Controls worth forcing into :hover / :focus: text inside, and a pointer or focus can reach them.
  interactiveList.forEach((el, i) => {
    if (!hasTextInside.has(el)) return;
    if (!el.checkVisibility() || getComputedStyle(el).visibility !== "visible") return;
    interactive.push(i);
  });
} else {
  visit(interactiveList[args.root]);
}
return {samples, skipped, interactive};
