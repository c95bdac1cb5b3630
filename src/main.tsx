import "./lib/strictCsp";
import { StrictMode } from "react";
import { createRoot } from "react-dom/client";
import "@fontsource/inter-tight/latin-400.css";
import "@fontsource/inter-tight/latin-500.css";
import "@fontsource/inter-tight/latin-600.css";
import "@fontsource/inter-tight/latin-700.css";
import "./index.css";
import { AppProviders } from "./app/providers";

const root = document.getElementById("root");
if (!root) throw new Error("index.html has no #root element.");

createRoot(root).render(
  <StrictMode>
    <AppProviders />
  </StrictMode>,
);
