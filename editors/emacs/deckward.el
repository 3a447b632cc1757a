;;; deckward.el --- Calculation decks and the deckward language server  -*- lexical-binding: t; -*-

;; Version: 0.1.0
;; Package-Requires: ((emacs "28.1") (eglot "1.9"))
;; Keywords: languages, tools

;;; Commentary:

;; `deck-mode' for deckward's calculation decks (*.deck): comments,
;; highlighting, indentation by braces.  With eglot (built into Emacs 29,
;; the `elpa-eglot' package on Debian's Emacs 28) it starts `deckward serve'
;; for decks: diagnostics, quick fixes (`eglot-code-actions'), hover,
;; completion, rename and formatting (`eglot-format-buffer').
;;
;; In init.el:
;;
;;   (add-to-list 'load-path "/path/to/deckward/editors/emacs")
;;   (require 'deckward)
;;   (add-hook 'deck-mode-hook #'eglot-ensure)
;;
;; A folder holding deckward.yaml is a project of its own, so every deck
;; below it shares one server (as in a git repository).

;;; Code:

(require 'project)

(defgroup deckward nil
  "Calculation decks checked by deckward."
  :group 'languages)

(defcustom deckward-server-command '("deckward" "serve")
  "The command that starts the deckward language server, with its arguments."
  :type '(repeat string))

(defcustom deck-indent-offset 2
  "Columns of indentation per open brace in `deck-mode'."
  :type 'integer)

(defconst deck--statement-keywords
  '("use" "study" "geometry" "basis_set" "level" "state" "derive"))

(defvar deck-mode-syntax-table
  (let ((table (make-syntax-table)))
    (modify-syntax-entry ?# "<" table)
    (modify-syntax-entry ?\n ">" table)
    (modify-syntax-entry ?_ "_" table)
    (modify-syntax-entry ?\" "\"" table)
    (modify-syntax-entry ?\\ "\\" table)
    (dolist (c '(?+ ?- ?* ?/ ?= ?: ?, ?.))
      (modify-syntax-entry c "." table))
    table)
  "Syntax table of `deck-mode': `#' starts a comment to the end of the line.")

(defconst deck--name "[A-Za-z_][A-Za-z0-9_]*")
(defconst deck--word "[A-Za-z0-9+*()._'-]+")
(defconst deck--number "[+-]?\\(?:[0-9]+\\(?:\\.[0-9]*\\)?\\|\\.[0-9]+\\)\\(?:[eE][+-]?[0-9]+\\)?")

(defvar deck-font-lock-keywords
  `(;; geometry no2 {, level hf_adz {, state anion {, basis_set mix {
    (,(concat "^\\s-*\\(geometry\\|basis_set\\|level\\|state\\)\\s-+\\(" deck--name "\\)")
     (1 font-lock-keyword-face) (2 font-lock-type-face))
    (,(concat "^\\s-*\\(derive\\)\\s-+\\(" deck--name "\\)")
     (1 font-lock-keyword-face) (2 font-lock-function-name-face))
    ("^\\s-*\\(use\\|study\\)\\_>" (1 font-lock-keyword-face))
    ("\\_<\\(as\\|in\\|add\\|ghost\\)\\_>" (1 font-lock-keyword-face))
    ("\\_<\\(energy\\|orbital\\|optimize\\)\\s-*(" (1 font-lock-builtin-face))
    ;; basis = aug-cc-pvdz and the values of a basis map (O: aug-cc-pvdz)
    (,(concat "\\_<\\(?:basis\\|from\\)\\s-*=\\s-*\\(" deck--word "\\)") (1 font-lock-constant-face))
    (,(concat "\\_<" deck--name "\\s-*:\\s-*\\(" deck--word "\\)") (1 font-lock-constant-face))
    ;; keys: geometry = ..., charge = ...
    (,(concat "\\(" deck--name "\\)\\s-*=") (1 font-lock-variable-name-face))
    (,(concat "\\(?:^\\|[^A-Za-z0-9_.+*'-]\\)\\(" deck--number "\\)\\(?:$\\|[^A-Za-z0-9_.+*()'-]\\)")
     (1 font-lock-constant-face)))
  "Highlighting of `deck-mode'.")

(defun deck-indent-line ()
  "Indent the current line by the depth of the braces around it."
  (interactive)
  (let* ((depth (save-excursion (car (syntax-ppss (line-beginning-position)))))
         (closing (save-excursion (back-to-indentation) (looking-at-p "}")))
         (column (* deck-indent-offset (max 0 (- depth (if closing 1 0))))))
    (if (<= (current-column) (current-indentation))
        (indent-line-to column)
      (save-excursion (indent-line-to column)))))

;;;###autoload
(define-derived-mode deck-mode prog-mode "Deck"
  "Major mode for deckward calculation decks."
  :syntax-table deck-mode-syntax-table
  (setq-local comment-start "# ")
  (setq-local comment-start-skip "#+\\s-*")
  (setq-local comment-end "")
  (setq-local indent-line-function #'deck-indent-line)
  (setq-local font-lock-defaults '(deck-font-lock-keywords)))

;;;###autoload
(add-to-list 'auto-mode-alist '("\\.deck\\'" . deck-mode))

(defun deckward-project-find (dir)
  "A project for DIR when a folder above it holds deckward.yaml."
  (let ((root (locate-dominating-file dir "deckward.yaml")))
    (and root (cons 'deckward (file-name-as-directory (expand-file-name root))))))

(cl-defmethod project-root ((project (head deckward)))
  (cdr project))

(add-hook 'project-find-functions #'deckward-project-find)

(defun deckward--server-contact (&optional _interactive)
  "The server command, read when a server starts."
  deckward-server-command)

(with-eval-after-load 'eglot
  (add-to-list 'eglot-server-programs '(deck-mode . deckward--server-contact)))

(provide 'deckward)
;;; deckward.el ends here
