import { createRoot } from 'react-dom/client';

function App() {
  return (
    <main>
      <h1>Priorscope</h1>
      <p>Workbench under construction.</p>
    </main>
  );
}

createRoot(document.getElementById('root')!).render(<App />);
