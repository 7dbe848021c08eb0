;;; stoik-mode.el --- Major mode for stoik reaction libraries  -*- lexical-binding: t; -*-

;; Version: 0.1.0
;; Package-Requires: ((emacs "27.1"))
;; Keywords: languages, chemistry

;;; Commentary:

;; A major mode for `.stoik' files, the plain-text reaction libraries read
;; by stoik: statement keywords, labels, attribute names, arrows (the
;; resonance arrows `<->' and `↔' as errors), charges, phase tags, numbers,
;; units, strings, comments and `# stoik: allow RULE' suppressions are
;; highlighted.  Diagnostics, inlay hints, hover and code actions come from
;; the language server `stoik lsp', registered here for eglot:
;;
;;   (require 'stoik-mode)
;;   (add-hook 'stoik-mode-hook #'eglot-ensure)

;;; Code:

(defgroup stoik nil
  "Editing stoik reaction libraries."
  :group 'languages
  :prefix "stoik-")

(defcustom stoik-indent-offset 2
  "Indentation of continuation (attribute) lines."
  :type 'integer
  :group 'stoik)

(defface stoik-suppression-face
  '((t :inherit font-lock-preprocessor-face))
  "Face for `# stoik: allow RULE' suppression comments."
  :group 'stoik)

(defface stoik-charge-face
  '((t :inherit font-lock-constant-face))
  "Face for the charge of a formula."
  :group 'stoik)

(defface stoik-phase-face
  '((t :inherit font-lock-type-face))
  "Face for phase tags such as (g) and (aq)."
  :group 'stoik)

(defconst stoik-keywords '("units" "use" "species" "reaction" "mixture")
  "Statement keywords; a statement starts at column 0 with one of them.")

(defconst stoik--number-regexp
  "\\(?:^\\|[^[:alnum:]_.^]\\)\\([-+]?[0-9]+\\(?:\\.[0-9]+\\)?\\(?:[eE][-+]?[0-9]+\\)?\\)"
  "A number in a value or a coefficient, in group 1.")

(defconst stoik--unit-regexp
  (concat "[0-9][ \t]+"
          "\\(\\(?:°C\\|1/\\|[[:alpha:](]\\)[[:alnum:]°*·/^()-]*\\)")
  "A unit expression after a number and a space, in group 1.")

(defvar stoik-font-lock-keywords
  `(;; Statement keywords and the labels or aliases after them.
    (,(concat "^" (regexp-opt stoik-keywords 'symbols)) . font-lock-keyword-face)
    ("^\\(?:reaction\\|mixture\\)[ \t]+\\([[:alpha:]][[:alnum:]_-]*\\)"
     1 font-lock-function-name-face)
    ("^species[ \t]+\\([[:alpha:]][[:alnum:]_-]*\\)[ \t]*="
     1 font-lock-variable-name-face)
    ;; Attribute names: at the start of a continuation line, after `;', or
    ;; in a `units' statement.
    ("\\(?:^[ \t]+\\|;[ \t]*\\)\\([[:alpha:]][[:alnum:]_]*\\)[ \t]*="
     1 font-lock-builtin-face)
    ("\\(?:^units[ \t]+\\|,[ \t]*\\)\\([a-z]+\\)[ \t]*=" 1 font-lock-builtin-face)
    ;; Arrows; the resonance arrows are rejected.
    ("<->\\|↔" 0 font-lock-warning-face)
    ("[ \t]\\(<=>\\|⇌\\|⇄\\|->\\|→\\)[ \t]" 1 font-lock-keyword-face)
    ;; Formula pieces.
    ("(\\(?:g\\|l\\|s\\|aq\\))" 0 'stoik-phase-face)
    ("\\^[0-9]*[-+]" 0 'stoik-charge-face)
    ("[⁰¹²³⁴⁵⁶⁷⁸⁹]*[⁺⁻]" 0 'stoik-charge-face)
    ("[[:alnum:])₀-₉]\\([-+][0-9]*\\)\\(?:[^>0-9]\\|$\\)" 1 'stoik-charge-face)
    ("\\(?:^\\|[ \t0-9]\\)\\(e-\\|M\\|hv\\)\\(?:[ \t;#]\\|$\\)" 1 font-lock-constant-face)
    ;; Values.
    ("[ \t]\\(at\\)[ \t]" 1 font-lock-keyword-face)
    ("\\_<arrhenius\\_>" . font-lock-builtin-face)
    (,stoik--unit-regexp 1 font-lock-type-face)
    (,stoik--number-regexp 1 font-lock-constant-face))
  "Font-lock rules for `stoik-mode'.")

(defconst stoik--suppression-regexp
  "#[ \t]*stoik:[ \t]*allow\\(?:-file\\)?\\_>.*$"
  "A suppression comment.")

(defun stoik--font-lock-suppressions (limit)
  "Find the next suppression comment before LIMIT, outside strings."
  (let (found)
    (while (and (not found) (re-search-forward stoik--suppression-regexp limit t))
      ;; The character after `#' is inside a comment when that `#' starts
      ;; or sits in one, and not when it is part of a string.
      (when (save-excursion
              (save-match-data (nth 4 (syntax-ppss (1+ (match-beginning 0))))))
        (setq found t)))
    found))

(defvar stoik-mode-syntax-table
  (let ((table (make-syntax-table)))
    (modify-syntax-entry ?# "<" table)
    (modify-syntax-entry ?\n ">" table)
    (modify-syntax-entry ?\" "\"" table)
    (modify-syntax-entry ?\\ "\\" table)
    (modify-syntax-entry ?_ "_" table)
    (modify-syntax-entry ?- "_" table)
    (modify-syntax-entry ?+ "." table)
    (modify-syntax-entry ?= "." table)
    (modify-syntax-entry ?\; "." table)
    (modify-syntax-entry ?: "." table)
    (modify-syntax-entry ?* "." table)
    (modify-syntax-entry ?/ "." table)
    (modify-syntax-entry ?^ "." table)
    (modify-syntax-entry ?\( "()" table)
    (modify-syntax-entry ?\) ")(" table)
    (modify-syntax-entry ?\[ "(]" table)
    (modify-syntax-entry ?\] ")[" table)
    table)
  "Syntax table for `stoik-mode': `#' comments, double-quoted strings.")

(defun stoik-indent-line ()
  "Indent a line: statements at column 0, continuation lines by one step.
A line that already starts with whitespace is a continuation line and goes
to `stoik-indent-offset'; a line that starts with a keyword stays at 0."
  (interactive)
  (let ((target (save-excursion
                  (back-to-indentation)
                  (cond ((looking-at (regexp-opt stoik-keywords 'symbols)) 0)
                        ((and (bolp) (not (looking-at "[ \t]*$"))) 0)
                        (t stoik-indent-offset)))))
    (if (<= (current-column) (current-indentation))
        (indent-line-to target)
      (save-excursion (indent-line-to target)))))

;;;###autoload
(define-derived-mode stoik-mode prog-mode "stoik"
  "Major mode for stoik reaction libraries (.stoik files).

\\{stoik-mode-map}"
  :syntax-table stoik-mode-syntax-table
  :group 'stoik
  (setq-local comment-start "# ")
  (setq-local comment-start-skip "#+[ \t]*")
  (setq-local comment-end "")
  (setq-local comment-use-syntax t)
  (setq-local indent-line-function #'stoik-indent-line)
  (setq-local indent-tabs-mode nil)
  (setq-local font-lock-defaults
              (list (append stoik-font-lock-keywords
                            '((stoik--font-lock-suppressions
                               0 'stoik-suppression-face t)))
                    nil nil)))

;;;###autoload
(add-to-list 'auto-mode-alist '("\\.stoik\\'" . stoik-mode))

;; The language server, for eglot (built into Emacs 29, a package before).
;;;###autoload
(with-eval-after-load 'eglot
  (defvar eglot-server-programs)
  (add-to-list 'eglot-server-programs '(stoik-mode "stoik" "lsp")))

(provide 'stoik-mode)

;;; stoik-mode.el ends here
