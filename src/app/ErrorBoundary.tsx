/**
 * The last line of defence: if showing the workbench fails (for example a saved session that no
 * validator foresaw), the page says so in plain words and offers a way out instead of going blank.
 */
import { Component, type ReactNode } from 'react';

interface Props {
  readonly children: ReactNode;
  /** Opens the default demo in the running workbench (the saved session is overwritten only by later edits). */
  readonly startOver: () => Promise<void> | void;
  /** Removes the saved session and reloads the page. */
  readonly clearSaved: () => Promise<void> | void;
}

interface State {
  readonly failed: boolean;
}

export class ErrorBoundary extends Component<Props, State> {
  override state: State = { failed: false };

  static getDerivedStateFromError(): State {
    return { failed: true };
  }

  override componentDidCatch(error: unknown): void {
    // Kept for the developer console; the user sees only our message.
    console.error('priorscope: the workbench could not be shown', error);
  }

  override render(): ReactNode {
    if (!this.state.failed) return this.props.children;
    const startOver = async () => {
      await this.props.startOver();
      this.setState({ failed: false });
    };
    return (
      <div className="recover" role="alert" data-testid="recover">
        <h1>Priorscope could not show this session</h1>
        <p>
          Something in the current or saved session could not be displayed. Your files are not affected. You can start over on the default
          demo, or clear the saved session in this browser and reload.
        </p>
        <p>
          <button type="button" data-testid="recover-start-over" onClick={() => void startOver()}>
            Start over
          </button>{' '}
          <button type="button" data-testid="recover-clear" onClick={() => void this.props.clearSaved()}>
            Clear the saved session
          </button>
        </p>
      </div>
    );
  }
}
