;;; test_eglot.el --- end-to-end test of `stoik lsp' with Emacs and eglot  -*- lexical-binding: t -*-

;; Run: WORK=<dir holding demo.stoik> STOIK_BIN=<binary> emacs --batch -l test_eglot.el
;; (without -Q, so that Debian's elpa-eglot is on the load path).  Exits 0
;; when every check passes and 1 otherwise.

(require 'eglot)
(require 'flymake)
(require 'subr-x)

(defvar stoik-test-failures 0)

(defun stoik-test-check (ok what)
  (if ok
      (message "ok: %s" what)
    (setq stoik-test-failures (1+ stoik-test-failures))
    (message "FAIL: %s" what)))

(defun stoik-test-wait (pred seconds)
  "Wait up to SECONDS for PRED, pumping the server's output."
  (let ((deadline (+ (float-time) seconds)) (done nil))
    (while (and (not (setq done (funcall pred))) (< (float-time) deadline))
      (accept-process-output nil 0.05))
    done))

(define-derived-mode stoik-test-mode prog-mode "stoik")

(defun stoik-test-balance-diagnostics ()
  (flymake-start)
  (accept-process-output nil 0.05)
  (seq-filter (lambda (d) (string-match-p "not balanced" (flymake-diagnostic-text d)))
              (flymake-diagnostics)))

(defun stoik-test-main ()
  (let* ((work (file-name-as-directory (getenv "WORK")))
         (bin (getenv "STOIK_BIN"))
         (project-find-functions (list (lambda (_dir) (cons 'transient work)))))
    (find-file (concat work "demo.stoik"))
    (stoik-test-mode)
    (eglot '(stoik-test-mode) (project-current) 'eglot-lsp-server (list bin "lsp") "stoik")
    (stoik-test-check (stoik-test-wait (lambda () (eglot-current-server)) 10) "eglot connected")
    (stoik-test-check (stoik-test-wait (lambda () (stoik-test-balance-diagnostics)) 15)
                      "a diagnostic for the unbalanced equation")
    (let* ((server (eglot--current-server-or-lose))
           (pos (save-excursion (goto-char (point-min)) (search-forward "burn: meth") (point)))
           (hover (jsonrpc-request server :textDocument/hover
                                   (list :textDocument (eglot--TextDocumentIdentifier)
                                         :position (eglot--pos-to-lsp-position pos))))
           (value (plist-get (plist-get hover :contents) :value)))
      (stoik-test-check (and value (string-match-p "C 1, H 4" value)) "hover shows the composition")
      (let* ((line-start (save-excursion (goto-char pos) (line-beginning-position)))
             (line-end (save-excursion (goto-char pos) (line-end-position)))
             (actions (jsonrpc-request server :textDocument/codeAction
                                       (list :textDocument (eglot--TextDocumentIdentifier)
                                             :range (list :start (eglot--pos-to-lsp-position line-start)
                                                          :end (eglot--pos-to-lsp-position line-end))
                                             :context (list :diagnostics []))))
             (balance (seq-find (lambda (a) (equal (plist-get a :title) "balance the equation"))
                                actions)))
        (stoik-test-check balance "a balance action is offered")
        (when balance
          (eglot--apply-workspace-edit (plist-get balance :edit))
          (eglot--signal-textDocument/didChange))
        (stoik-test-check
         (save-excursion (goto-char (point-min))
                         (search-forward "methane + 2 O2(g) -> CO2(g) + 2 H2O(g)" nil t))
         "the equation is balanced")
        (stoik-test-check (stoik-test-wait (lambda () (null (stoik-test-balance-diagnostics))) 15)
                          "the diagnostic disappears after the fix")))
    (eglot-shutdown (eglot--current-server-or-lose))))

(condition-case err
    (stoik-test-main)
  (error (setq stoik-test-failures (1+ stoik-test-failures))
         (message "FAIL: error %S" err)))
(kill-emacs (if (> stoik-test-failures 0) 1 0))
;;; test_eglot.el ends here
