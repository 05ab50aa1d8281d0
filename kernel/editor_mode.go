package kernel

import (
	"encoding/json"
	"strings"

	"lsys/lang"
	"lsys/lang/builtins"
)

// EditorModeJS is kernel.js, which the classic notebook loads from the
// kernelspec folder: it defines the CodeMirror mode "lsys" (named in
// language_info's codemirror_mode) so cells are highlighted instead of the
// notebook asking its server for a mode that does not exist. The token
// classes are lang's (shared with lsys run's reports); the keywords and
// built-ins come from the language's registry, so the mode never lags it.
// A built-in's name is highlighted where it is called (name followed by
// "("), as in the reports: a binding may reuse the name.
func EditorModeJS() string {
	kw, _ := json.Marshal(lang.KeywordNames())
	bi, _ := json.Marshal(builtins.Registry().Names())
	r := strings.NewReplacer(
		"@KEYWORDS@", string(kw), "@BUILTINS@", string(bi),
		"@KW@", lang.TokKeyword, "@BI@", lang.TokBuiltin, "@STR@", lang.TokString,
		"@NUM@", lang.TokNumber, "@COM@", lang.TokComment)
	return r.Replace(editorModeTemplate)
}

// EditorCSS is kernel.css, which the classic notebook loads with a
// kernel's page: the token classes in the colours of lsys run's reports
// (the notebook's own theme gives built-ins and numbers the same green).
func EditorCSS() string {
	return "/* lsys token colours (written by lsys kernelspec) */\n" + lang.TokenCSS(".CodeMirror.cm-s-ipython span")
}

const editorModeTemplate = `// lsys editor mode for the classic notebook (written by lsys kernelspec).
define(["codemirror/lib/codemirror", "base/js/namespace"], function (CodeMirror, Jupyter) {
  "use strict";
  var keywords = set(@KEYWORDS@);
  var builtins = set(@BUILTINS@);
  function set(list) {
    var o = {};
    for (var i = 0; i < list.length; i++) { o[list[i]] = true; }
    return o;
  }
  function define() {
    CodeMirror.defineMode("lsys", function () {
      return {
        token: function (stream) {
          if (stream.eatSpace()) { return null; }
          var ch = stream.peek();
          if (ch === "#") { stream.skipToEnd(); return "@COM@"; }
          if (ch === '"') {
            stream.next();
            var c;
            while ((c = stream.next()) != null) {
              if (c === "\\") { stream.next(); } else if (c === '"') { break; }
            }
            return "@STR@";
          }
          if (stream.match(/^(\d[\d_]*(\.[\d_]*)?|\.\d[\d_]*)([eE][+-]?\d+)?j?/)) { return "@NUM@"; }
          if (stream.match(/^[A-Za-z_][A-Za-z0-9_]*/)) {
            var w = stream.current();
            if (keywords.hasOwnProperty(w)) { return "@KW@"; }
            if (builtins.hasOwnProperty(w) && stream.peek() === "(") { return "@BI@"; }
            return null;
          }
          stream.next();
          return null;
        },
        lineComment: "#"
      };
    });
    CodeMirror.defineMIME("text/x-lsys", "lsys");
  }
  return {
    onload: function () {
      define();
      // cells created before the mode existed get it now
      if (Jupyter && Jupyter.notebook) {
        Jupyter.notebook.get_cells().forEach(function (cell) {
          if (cell.cell_type === "code" && cell.code_mirror) { cell.code_mirror.setOption("mode", "lsys"); }
        });
      }
    }
  };
});
`
