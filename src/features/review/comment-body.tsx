import { memo } from "react";
import Markdown, { type Components } from "react-markdown";
import remarkGfm from "remark-gfm";

/**
 * What a comment may format: emphasis, code, quotes, lists, links and line
 * breaks. Everything else (headings, images, tables) is shown as its text.
 */
const ALLOWED = ["p", "br", "strong", "em", "del", "code", "pre", "blockquote", "ul", "ol", "li", "a"];

interface MdNode {
  type: string;
  value?: string;
  children?: MdNode[];
}

/**
 * Raw HTML typed into a comment is shown as the text it is, never parsed:
 * `<script>` reads as "<script>". (react-markdown would otherwise drop it.)
 */
function remarkHtmlAsText() {
  const walk = (node: MdNode, atRoot: boolean) => {
    node.children = node.children?.map((child) => {
      if (child.type !== "html") {
        walk(child, false);
        return child;
      }
      const text: MdNode = { type: "text", value: child.value ?? "" };
      // A block of HTML at the top level becomes a paragraph of text.
      return atRoot ? { type: "paragraph", children: [text] } : text;
    });
  };
  return (tree: MdNode) => walk(tree, true);
}

/** Only web and mail links, and paths inside Stagewright; `javascript:` and friends lose their link. */
export function safeUrl(url: string): string {
  const trimmed = url.trim();
  if (/^(https?:\/\/|mailto:)/i.test(trimmed)) return trimmed;
  if (trimmed.startsWith("/") && !trimmed.startsWith("//") && !trimmed.startsWith("/\\")) return trimmed;
  return "";
}

const components: Components = {
  a: ({ href, children }) =>
    href ? (
      <a href={href} target="_blank" rel="noopener noreferrer nofollow" className="font-bold text-indigo underline underline-offset-2">
        {children}
      </a>
    ) : (
      <span>{children}</span>
    ),
  code: ({ children }) => <code className="rounded bg-ink/5 px-1 font-mono text-[0.9em]">{children}</code>,
  pre: ({ children }) => <pre className="overflow-x-auto rounded bg-ink/5 p-2">{children}</pre>,
  blockquote: ({ children }) => <blockquote className="border-l-4 border-ink/20 pl-3 text-ink/80">{children}</blockquote>,
  ul: ({ children }) => <ul className="list-disc pl-5">{children}</ul>,
  ol: ({ children }) => <ol className="list-decimal pl-5">{children}</ol>,
};

/** A comment's text with its small, safe subset of Markdown. Nothing typed is ever rendered as HTML. */
function CommentBodyView({ text }: { text: string }) {
  return (
    <div className="space-y-2 break-words" data-comment-body="">
      <Markdown
        remarkPlugins={[remarkGfm, remarkHtmlAsText]}
        allowedElements={ALLOWED}
        unwrapDisallowed
        urlTransform={safeUrl}
        components={components}
      >
        {text}
      </Markdown>
    </div>
  );
}

export const CommentBody = memo(CommentBodyView);
