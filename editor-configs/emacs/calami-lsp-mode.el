;;; calami-lsp-mode.el --- The calami language server through lsp-mode  -*- lexical-binding: t; -*-

;; Works with lsp-mode 8.0 (Debian bookworm's elpa-lsp-mode) and newer.
;;
;; Usage, in your init file:
;;   (add-to-list 'load-path "/path/to/editor-configs/emacs")
;;   (with-eval-after-load 'lsp-mode (require 'calami-lsp-mode))
;;   (add-hook 'markdown-mode-hook #'lsp-deferred)   ; and so on, see README.md
;;
;; calami is registered as an add-on client: it runs next to whatever other
;; server lsp-mode starts for the buffer (pylsp, gopls, marksman, ...).

;;; Code:

(require 'lsp-mode)
(require 'cl-lib)

(defgroup lsp-calami nil
  "Context-aware spelling hints from the calami language server, via lsp-mode."
  :group 'lsp-mode
  :prefix "lsp-calami-")

(defcustom lsp-calami-server-command '("calami" "serve")
  "The command that starts the calami server on standard input/output.
Use an absolute path when calami lives in a virtual environment that is
not on `exec-path'."
  :type '(repeat string))

(defcustom lsp-calami-variant "any"
  "Which spelling variant of English counts as correct."
  :type '(choice (const "any") (const "en-US") (const "en-GB")))

(defcustom lsp-calami-hint-threshold 0.5
  "Probability that a word is wrong needed before a hint is shown, in (0, 1]."
  :type 'number)

(defcustom lsp-calami-confident-threshold 0.95
  "A replacement above this probability is offered as the preferred fix."
  :type 'number)

(defconst lsp-calami--severities
  '(choice (const "error") (const "warning") (const "information") (const "hint")))

(defcustom lsp-calami-severity-nonword "information"
  "How a word that is not in the vocabulary at all is shown."
  :type lsp-calami--severities)

(defcustom lsp-calami-severity-realword "hint"
  "How a real word that looks wrong in its context is shown."
  :type lsp-calami--severities)

(defcustom lsp-calami-max-suggestions 5
  "The largest number of replacements offered for one word."
  :type 'integer)

(defcustom lsp-calami-check-strings nil
  "Non-nil to check string literals in source files, not only comments."
  :type 'boolean)

(defcustom lsp-calami-debounce-ms 150
  "Milliseconds the server waits after the last edit before checking again."
  :type 'integer)

(defcustom lsp-calami-model-path ""
  "A model file to use instead of the shipped one; empty for the shipped model."
  :type 'string)

(defcustom lsp-calami-word-list "calami-lexicon.txt"
  "The project lexicon file, relative to the project root."
  :type 'string)

(defcustom lsp-calami-modes
  '((markdown-mode . "markdown") (gfm-mode . "markdown")
    (rst-mode . "restructuredtext")
    (LaTeX-mode . "latex") (latex-mode . "latex")
    (plain-TeX-mode . "tex") (plain-tex-mode . "tex")
    (git-commit-mode . "git-commit")
    (mhtml-mode . "html") (html-mode . "html")
    (python-mode . "python") (python-ts-mode . "python")
    (js-mode . "javascript") (js-ts-mode . "javascript")
    (typescript-mode . "typescript") (typescript-ts-mode . "typescript")
    (tsx-ts-mode . "typescriptreact")
    (rust-mode . "rust") (rustic-mode . "rust") (rust-ts-mode . "rust")
    (go-mode . "go") (go-ts-mode . "go")
    (c-mode . "c") (c-ts-mode . "c")
    (c++-mode . "cpp") (c++-ts-mode . "cpp")
    (java-mode . "java") (java-ts-mode . "java")
    (sh-mode . "shellscript") (bash-ts-mode . "shellscript")
    (yaml-mode . "yaml") (yaml-ts-mode . "yaml")
    (conf-toml-mode . "toml") (toml-ts-mode . "toml")
    (text-mode . "plaintext"))
  "Major modes calami serves, with the LSP language id sent for each.
Only exact modes count (a mode derived from `text-mode' is not plain text)."
  :type '(alist :key-type symbol :value-type string))

(lsp-register-custom-settings
 '(("calami.variant" lsp-calami-variant)
   ("calami.hintThreshold" lsp-calami-hint-threshold)
   ("calami.confidentThreshold" lsp-calami-confident-threshold)
   ("calami.severity.nonword" lsp-calami-severity-nonword)
   ("calami.severity.realword" lsp-calami-severity-realword)
   ("calami.maxSuggestions" lsp-calami-max-suggestions)
   ("calami.checkStrings" lsp-calami-check-strings t)
   ("calami.debounceMs" lsp-calami-debounce-ms)
   ("calami.modelPath" lsp-calami-model-path)
   ("calami.wordList" lsp-calami-word-list)))

(defun lsp-calami--language-id (&optional buffer)
  "The language id calami gets for BUFFER, or nil when calami does not serve it.
A Magit commit buffer (minor mode `git-commit-mode') counts as a commit message."
  (with-current-buffer (or buffer (current-buffer))
    (or (and (bound-and-true-p git-commit-mode) "git-commit")
        (cdr (assq major-mode lsp-calami-modes)))))

(defun lsp-calami--settings ()
  "The \"calami\" section as a hash table, for initializationOptions."
  (gethash "calami" (lsp-configuration-section "calami")))

(defun lsp-calami--program-available-p ()
  "Non-nil when the server program can be run."
  (let ((program (car lsp-calami-server-command)))
    (if (file-name-absolute-p program)
        (file-executable-p program)
      (executable-find program))))

(defvar lsp-calami--warned-missing nil
  "Non-nil once the missing server program has been reported this session.")

(defun lsp-calami--activate-p (_file-name _mode)
  "Non-nil when calami serves the current buffer.
Reports once per session when it would, but the program is missing."
  (let ((language (lsp-calami--language-id)))
    (when (and language (not (lsp-calami--program-available-p)) (not lsp-calami--warned-missing))
      (setq lsp-calami--warned-missing t)
      (display-warning
       'calami
       (format (concat "calami: the server program `%s' was not found on PATH; install calami "
                       "(for example `pipx install calami') or set `lsp-calami-server-command'")
               (car lsp-calami-server-command))))
    language))

(defun lsp-calami-last-error ()
  "The last \"calami: ...\" line a calami server wrote to stderr, or nil."
  (let (found)
    (dolist (buffer (buffer-list))
      (when (string-match-p "calami.*::stderr" (buffer-name buffer))
        (with-current-buffer buffer
          (save-excursion
            (goto-char (point-max))
            (when (re-search-backward "^calami: .*$" nil t)
              (setq found (match-string 0)))))))
    found))

(defun lsp-calami--explain-exit (workspace)
  "After WORKSPACE's server stopped, show calami's own reason if it gave one."
  (when (eq (lsp--client-server-id (lsp--workspace-client workspace)) 'calami)
    (let ((process (lsp--workspace-cmd-proc workspace)))
      (when (and process (not (zerop (process-exit-status process))))
        (let ((reason (lsp-calami-last-error)))
          (when reason
            (lsp--error "%s" reason)))))))

(add-hook 'lsp-after-uninitialized-functions #'lsp-calami--explain-exit)

(lsp-register-client
 (make-lsp-client
  :new-connection (lsp-stdio-connection (lambda () lsp-calami-server-command)
                                        #'lsp-calami--program-available-p)
  :activation-fn #'lsp-calami--activate-p
  :language-id #'lsp-calami--language-id
  :server-id 'calami
  :add-on? t
  :priority -1
  :initialization-options #'lsp-calami--settings
  :initialized-fn (lambda (workspace)
                    (with-lsp-workspace workspace
                      (lsp--set-configuration (lsp-configuration-section "calami"))))))

(defun lsp-calami-check-program ()
  "Say whether the calami server program can be found, and how to fix it if not."
  (interactive)
  (if (lsp-calami--program-available-p)
      (message "calami: using %s" (car lsp-calami-server-command))
    (message (concat "calami: the server program `%s' was not found on PATH; install calami "
                     "(for example `pipx install calami') or set `lsp-calami-server-command'")
             (car lsp-calami-server-command))))

(provide 'calami-lsp-mode)
;;; calami-lsp-mode.el ends here
