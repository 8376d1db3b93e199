import './base.css';
import './workbench.css';
